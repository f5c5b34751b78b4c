"""Loading: file -> Source -> (plain data, spans) -> validated record."""
