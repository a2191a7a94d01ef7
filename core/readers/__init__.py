"""What every file reader shares: decoding an upload's bytes."""
