from picker.cli import main

raise SystemExit(main())
