"""Many cases at once: worker processes or a Dask cluster, and the folder's records index."""
