"""User directories, atomic storage, saved profiles and plan files."""
