"""The command line: the only stage that parses arguments, picks exit codes and
writes to the terminal."""
