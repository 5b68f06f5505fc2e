"""Write notebooks/*.ipynb from the cell sources in scripts/notebook-src/*.md (cells separated by
lines '%% md' / '%% ts'). Keeps notebooks reviewable as plain text; run with /usr/bin/python3."""
import json, pathlib, re, sys, hashlib

root = pathlib.Path(__file__).resolve().parent.parent
for src in sorted((root / "scripts" / "notebook-src").glob("*.txt")):
    text = src.read_text()
    parts = re.split(r"^%% (md|ts)\s*$", text, flags=re.M)
    cells = []
    for kind, body in zip(parts[1::2], parts[2::2]):
        body = body.strip("\n")
        cid = hashlib.sha1(f"{src.stem}/{len(cells)}".encode()).hexdigest()[:8]
        lines = [l + "\n" for l in body.split("\n")]
        if lines:
            lines[-1] = lines[-1].rstrip("\n")
        if kind == "md":
            cells.append({"cell_type": "markdown", "id": cid, "metadata": {}, "source": lines})
        else:
            cells.append({"cell_type": "code", "id": cid, "metadata": {}, "execution_count": None, "outputs": [], "source": lines})
    nb = {
        "cells": cells,
        "metadata": {
            "kernelspec": {"display_name": "TypeScript", "language": "typescript", "name": "tslab"},
            "language_info": {"codemirror_mode": {"mode": "typescript", "name": "javascript", "typescript": True}, "file_extension": ".ts", "mimetype": "text/typescript", "name": "typescript", "version": "5.0.4"},
        },
        "nbformat": 4,
        "nbformat_minor": 5,
    }
    out = root / "notebooks" / f"{src.stem}.ipynb"
    out.write_text(json.dumps(nb, indent=1, ensure_ascii=False) + "\n")
    print(f"wrote {out.relative_to(root)} ({len(cells)} cells)")
