import sys

from swingsim.cli.main import main

sys.exit(main())
