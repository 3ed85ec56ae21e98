"""Storage: the one place that holds SQL. One module per aggregate, plain functions taking a
connection. Views and the CLI call these functions; they never execute SQL themselves."""
