"""Self-contained interactive 3D pages (one HTML file, offline) and notebook display.

:mod:`.options` holds the page's options, :mod:`.build` turns states into the page's data and
HTML, :mod:`.notebook` makes the objects Jupyter displays. The page's script,
``viewer.js``, is three.js and our page code bundled by ``tools/viewer/build.sh``; its licence
is ``THREE-LICENSE.txt`` beside it.
"""
