"""The modes new files and folders get under the process's umask (a site folder, a record set)."""

from __future__ import annotations

import os


def current_umask():
    """The process's umask, read without changing it where the system allows."""
    try:
        with open("/proc/self/status", encoding="ascii") as status:
            for line in status:
                if line.startswith("Umask:"):
                    return int(line.split()[1], 8)
    except (OSError, ValueError):
        pass
    mask = os.umask(0o022)  # no /proc: the classic set-and-restore
    os.umask(mask)
    return mask


def file_mode():
    """Mode of a new file under the current umask (0o644 under umask 022)."""
    return 0o666 & ~current_umask()


def folder_mode():
    """Mode of a new folder under the current umask (0o755 under umask 022)."""
    return 0o777 & ~current_umask()
