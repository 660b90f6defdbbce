"""The record: building it from a result, its digests, issuing it as a set, its companions."""
