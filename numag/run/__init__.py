"""Running the work: executors, run folders and the process's memory.

Owns how batches run (in-process, a local process pool, Dask; retries, failures, the ambient executor
``using`` and the work limits ``--max-paths`` / ``--max-memory``, in ``executor``), run folders that
save each batch and resume (``checkpoint``: a manifest with fingerprints, ``.npz`` batches with
checksums), and keeping freed memory in the process (``allocation``). It sits just above
:mod:`numag.system` and below :mod:`numag.numeric`, so that evaluation can charge its memory and the
tracker can hand batches to an executor without importing upwards. This ``__init__`` imports nothing.
"""
