"""Output: records (plain data), terminal tables, files."""
