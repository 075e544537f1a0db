from coordination.cli import main

main()
