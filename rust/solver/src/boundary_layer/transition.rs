//! Amplification model interface of free transition (e^N method).

/// Rate of growth of the envelope amplification factor along the surface, dN/ds (1/length).
pub trait AmplificationModel: Send + Sync {
    /// dN/ds in 1/length (the unit of `theta`); zero below the critical Reynolds number.
    fn growth_rate(&self, h: f64, re_theta: f64, theta: f64) -> f64;
}
