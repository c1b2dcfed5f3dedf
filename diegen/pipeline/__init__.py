"""Building a spec into files: rib jobs, content hashes, the manifest, the lock, per-piece writing, workers, diff.

Layout: ``<out>/<spec id>/<part id>/<part id>-{die.step,die.stl,blank.dxf,...}`` and
``<out>/<spec id>/manifest.json``.  Every file is written atomically.  A piece is rebuilt only when the hash of
what it is made from (its analysed numbers and the spec, :mod:`~diegen.pipeline.hashing`) changed or one of its
files is missing; a rib whose inputs hash the same as last time is not even re-analysed.  The manifest is
rewritten after every finished piece, so an interrupted build keeps what it finished and the next build does only
the rest.  One build at a time may write into a spec's folder (:mod:`~diegen.pipeline.lock`).
"""
