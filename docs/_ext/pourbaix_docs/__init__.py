"""Sphinx extensions of the pourbaix documentation: math to SVG, generated pages, checked examples."""
