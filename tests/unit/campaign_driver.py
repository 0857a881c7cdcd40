"""Runs the `wakerank` command line with the fake core, for subprocess tests (kill, Ctrl-C).

Usage: python campaign_driver.py run CAMPAIGN.toml --out DIR ...  (same arguments as wakerank)
With WAKERANK_TEST_CORE=real in the environment the real sections and analysis are used.
"""

from __future__ import annotations

import os
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).parent))

import campaign_fakes
import wakerank.cases
import wakerank.runner

if os.environ.get("WAKERANK_TEST_CORE") != "real":
    wakerank.cases._build = campaign_fakes.build_fake
    wakerank.runner._default_analysis = lambda: campaign_fakes.slow_fake_analyze

from wakerank.cli import main

if __name__ == "__main__":
    sys.argv = ["wakerank", *sys.argv[1:]]
    main()
