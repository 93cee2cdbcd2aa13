"""What `build.py` does, one job per module:

    common     paths, the app's name and colours, logging, digests, the app's bridge for the build
    machine    setting up the machine: Debian packages, the test tools' .venv
    fetch      pinned downloads checked against their digests (Pyodide, the micropip wheel)
    wheel      the app's own wheel (pycore/ + app/), reproducible
    icons      PNG icons rasterised from web/icon.svg
    prerender  the opening worksheet's form and index.html
    assemble   dist/ from all of the above, the manifest, engine.json and the service worker's precache list
    workerbundle  dist/worker.js: the worker, its caches module and Pyodide's loader joined in one file
    server     the static HTTP server for dist/

The build needs only the Python standard library, npm and pip; nothing here is shipped to the browser.
"""
