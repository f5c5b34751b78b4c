"""The build: runs the stages in order and writes the site atomically."""
