from synccore.cli.main import main

main()
