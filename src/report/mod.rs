//! Text, JSON and CSV reports of a solve.
