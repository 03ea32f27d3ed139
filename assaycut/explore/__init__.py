"""The cut-point explorer: a local web page to move cut points and see yields, qualities, limits and worth
move with them (``assaycut explore``).  :mod:`.session` answers, :mod:`.server` serves; the page is in
``static/`` (plain JavaScript and SVG, no build step)."""
