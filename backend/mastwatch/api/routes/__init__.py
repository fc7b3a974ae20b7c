"""API routers, one module per resource; each defines ``router`` (prefix-free paths)."""
