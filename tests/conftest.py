"""Settings for the whole test suite, applied before any test module loads Qt.

No test may reach a print server. Creating a ``QPrinter`` (the print and
print-preview tests do) makes Qt's CUPS support ask the local print server for
its printers; on a machine where the print port accepts a connection and never
answers, that call blocks for good and the suite hangs. Pointing libcups at a
socket that does not exist makes the question fail at once, so Qt falls back
to its built-in paper sizes, which is all the tests need. Subprocesses started
by the command-line tests inherit the setting.
"""

from __future__ import annotations

import os
import tempfile

os.environ["CUPS_SERVER"] = os.path.join(tempfile.gettempdir(), "tiltyard-tests-no-print-server.sock")
os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
