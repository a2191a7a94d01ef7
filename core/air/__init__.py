"""Air at the engine and at the strip: atmosphere, altimeter setting, strip weather."""
