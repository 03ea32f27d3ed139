"""Report writers around the computational core: terminal tables, Markdown, CSV, xlsx and PNG plots."""
