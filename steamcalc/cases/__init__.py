"""What a user keeps: site files, case files, the case-file writer and new plant folders."""
