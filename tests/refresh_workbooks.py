"""Re-execute the workbooks and store the outputs nbval compares.

Run from the repository root after changing a calculation or a workbook:

    python tests/refresh_workbooks.py

Cells tagged ``nbval-ignore-output`` (widgets, charts, previews) are stored
without outputs, execution timestamps and the widget state are dropped, so that a fresh JupyterLab
shows no stale widgets and the diff stays small. Records the run writes go to
each workbook's own record folder (git ignores it).
"""

import sys
from pathlib import Path

import nbformat
from nbclient import NotebookClient

WORKBOOKS = Path(__file__).resolve().parent.parent / "workbooks"


def refresh(path):
    notebook = nbformat.read(path, as_version=4)
    NotebookClient(notebook, timeout=600, kernel_name="python3",
                   resources={"metadata": {"path": str(path.parent)}}).execute()
    for cell in notebook.cells:
        # Execution timestamps change on every run and say nothing a reviewer needs.
        cell.metadata.pop("execution", None)
        if cell.cell_type == "code":
            if "nbval-ignore-output" in cell.metadata.get("tags", []):
                cell.outputs = []
                cell.execution_count = None
            for output in cell.outputs:
                # A live widget whose text is compared (the workbook's summary) is stored as its text:
                # its model is gone once the kernel stops, and a fresh JupyterLab shows the text.
                data = output.get("data", {})
                if "text/plain" in data:
                    data.pop("application/vnd.jupyter.widget-view+json", None)
    notebook.metadata.pop("widgets", None)
    nbformat.write(notebook, path)
    print(f"refreshed {path.relative_to(WORKBOOKS.parent)}")


if __name__ == "__main__":
    targets = [Path(a).resolve() for a in sys.argv[1:]] or sorted(WORKBOOKS.glob("*.ipynb"))
    for target in targets:
        refresh(target)
