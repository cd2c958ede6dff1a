"""The bundle's one program: ``casedepth …`` is the command line, ``casedepth gui [PLAN]`` the window (the bundle's
``casedepth-gui`` launcher runs that). PyInstaller freezes this file (packaging/build_bundle.sh)."""

import sys

from casedepth.cli import main

if __name__ == "__main__":
    sys.exit(main())
