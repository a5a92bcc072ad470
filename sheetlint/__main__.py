import sys

from sheetlint.cli import main

sys.exit(main())
