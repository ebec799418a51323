from codesearch.cli import main

raise SystemExit(main())
