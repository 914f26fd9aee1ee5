"""Test-wide setup: the desktop program's recovery folder is a private temporary folder.

Windows built by the tests autosave unsaved edits (``app.recovery``); they must never write into,
or offer back files from, the user's real recovery folder. Tests that look at recovery files set
``ENGINE_AIR_RECOVERY_DIR`` to their own ``tmp_path`` on top of this.
"""

import atexit
import os
import shutil
import tempfile

_RECOVERY_DIR = tempfile.mkdtemp(prefix="engine-air-test-recovery-")
os.environ["ENGINE_AIR_RECOVERY_DIR"] = _RECOVERY_DIR
atexit.register(shutil.rmtree, _RECOVERY_DIR, True)
