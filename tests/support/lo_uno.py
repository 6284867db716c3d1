#!/usr/bin/python3
"""Drive LibreOffice headless through its UNO API -- the outside word processor the tests use
to accept or reject our tracked changes (ECMA-376 Part 1 §17.13) and to convert to PDF.

Run under Debian's own ``/usr/bin/python3``: the ``uno`` module (package ``python3-uno``)
imports only there, never inside the project's virtual environment.  The venv side
(``tests/support/lo_session.py``) starts this script once per test process and talks to it in
JSON lines over stdin/stdout:

    request  {"op": "inspect", "path": "/x/out.docx", "action": "none|accept|reject",
              "pdf": "/x/out.pdf" | null, "save_as": "/x/accepted.docx" | null}
    reply    {"ok": true, "redlines_before": 3, "redlines_after": 0,
              "redlines": [{"type": "Insert", "author": "...", "text": "..." | null}],
              "body": [{"type": "paragraph", "text": "...", "label": "7.2" | null},
                       {"type": "table", "rows": [["cell", ...], ...],
                        "paragraphs": [{"type": "paragraph", "text": ..., "label": ...}]}],
              "comments": [{"author": "...", "content": "...", "anchor": "..."}],
              "user_properties": {"name": "value"}, "pdf_bytes": 12345 | null}
    request  {"op": "quit"}

Facts checked on this machine type (LibreOffice 7.4, Debian 12):

* one soffice per test process, each with its own ``-env:UserInstallation`` profile and its
  own pipe name, so parallel test processes never share a profile or a connection;
* every file is loaded from a PRIVATE COPY: a lock file left beside a shared file makes a
  second LibreOffice open it read-only, and Accept All then silently does nothing;
* the text returned is what LibreOffice shows: auto-number labels are not part of a
  paragraph's string, tabs are ``"\\t"`` and line breaks ``"\\n"``.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
import tempfile
import time
import traceback
import uuid

import uno
from com.sun.star.beans import PropertyValue  # type: ignore[import-not-found]
from com.sun.star.connection import NoConnectException  # type: ignore[import-not-found]

#: Seconds to wait for a freshly started soffice to accept the pipe connection.  The first
#: start with a fresh profile takes 3-10 s on the 2-core test machine; generous on purpose.
CONNECT_TIMEOUT_S = 90.0
CONNECT_POLL_S = 0.25


def _prop(name: str, value: object) -> PropertyValue:
    p = PropertyValue()
    p.Name = name
    p.Value = value
    return p


def _find_soffice() -> str:
    for candidate in (shutil.which("soffice"), "/usr/bin/soffice", "/usr/lib/libreoffice/program/soffice"):
        if candidate and os.access(candidate, os.X_OK):
            return candidate
    raise SystemExit("LibreOffice (soffice) is not installed; `make test` installs libreoffice-writer")


class Office:
    def __init__(self) -> None:
        self.work = tempfile.mkdtemp(prefix="cd-uno-")
        profile = os.path.join(self.work, "profile")
        self.pipe = "cd_uno_" + uuid.uuid4().hex
        env = dict(os.environ)
        env.pop("DISPLAY", None)
        self.proc = subprocess.Popen(
            [
                _find_soffice(),
                "-env:UserInstallation=" + uno.systemPathToFileUrl(profile),
                "--headless", "--invisible", "--nologo", "--norestore", "--nodefault",
                "--nolockcheck",
                f"--accept=pipe,name={self.pipe};urp;StarOffice.ComponentContext",
            ],
            stdin=subprocess.DEVNULL, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
            env=env,
        )
        local = uno.getComponentContext()
        resolver = local.ServiceManager.createInstanceWithContext(
            "com.sun.star.bridge.UnoUrlResolver", local)
        deadline = time.monotonic() + CONNECT_TIMEOUT_S
        while True:
            try:
                self.ctx = resolver.resolve(
                    f"uno:pipe,name={self.pipe};urp;StarOffice.ComponentContext")
                break
            except NoConnectException as error:
                if self.proc.poll() is not None or time.monotonic() > deadline:
                    raise RuntimeError("soffice did not accept the UNO connection") from error
                time.sleep(CONNECT_POLL_S)
        smgr = self.ctx.ServiceManager
        self.desktop = smgr.createInstanceWithContext("com.sun.star.frame.Desktop", self.ctx)
        self.dispatcher = smgr.createInstanceWithContext(
            "com.sun.star.frame.DispatchHelper", self.ctx)

    # ---------------------------------------------------------------------------------
    def inspect(self, path: str, action: str, pdf: str | None, save_as: str | None = None) -> dict:
        private = os.path.join(self.work, uuid.uuid4().hex + os.path.splitext(path)[1])
        shutil.copyfile(path, private)
        doc = self.desktop.loadComponentFromURL(
            uno.systemPathToFileUrl(private), "_blank", 0,
            (_prop("Hidden", True), _prop("ReadOnly", False)))
        if doc is None:
            raise RuntimeError(f"LibreOffice could not load {os.path.basename(path)}")
        try:
            before = doc.getRedlines().getCount()
            if action in ("accept", "reject"):
                frame = doc.getCurrentController().getFrame()
                command = (".uno:AcceptAllTrackedChanges" if action == "accept"
                           else ".uno:RejectAllTrackedChanges")
                self.dispatcher.executeDispatch(frame, command, "", 0, ())
            elif action != "none":
                raise ValueError(f"unknown action {action!r}")
            after = doc.getRedlines().getCount()
            reply = {
                "ok": True,
                "redlines_before": before,
                "redlines_after": after,
                "redlines": self._redlines(doc),
                "body": self._body(doc),
                "comments": self._comments(doc),
                "user_properties": self._user_properties(doc),
                "pdf_bytes": None,
            }
            if pdf:
                doc.storeToURL(uno.systemPathToFileUrl(pdf),
                               (_prop("FilterName", "writer_pdf_Export"),))
                reply["pdf_bytes"] = os.path.getsize(pdf)
            if save_as:
                doc.storeToURL(uno.systemPathToFileUrl(save_as),
                               (_prop("FilterName", "MS Word 2007 XML"),))
            return reply
        finally:
            doc.close(True)
            try:
                os.unlink(private)
            except OSError:
                pass

    @staticmethod
    def _redlines(doc) -> list:
        out = []
        enum = doc.getRedlines().createEnumeration()
        while enum.hasMoreElements():
            r = enum.nextElement()
            out.append({
                "type": r.getPropertyValue("RedlineType"),
                "author": r.getPropertyValue("RedlineAuthor"),
                "text": Office._redline_text(r),
            })
        return out

    @staticmethod
    def _redline_text(redline) -> str | None:
        """The text a tracked change covers, as LibreOffice holds it (None if it cannot say):
        a cursor from the change's start to its end."""
        try:
            start = redline.getPropertyValue("RedlineStart")
            end = redline.getPropertyValue("RedlineEnd")
            cursor = start.getText().createTextCursorByRange(start)
            cursor.gotoRange(end, True)
            return cursor.getString()
        except Exception:
            return None

    @staticmethod
    def _body(doc) -> list:
        out = []
        enum = doc.getText().createEnumeration()
        while enum.hasMoreElements():
            el = enum.nextElement()
            if el.supportsService("com.sun.star.text.TextTable"):
                rows = []
                for r in range(el.getRows().getCount()):
                    row = []
                    for c in range(el.getColumns().getCount()):
                        try:
                            cell = el.getCellByPosition(c, r)
                        except Exception:
                            continue
                        row.append(cell.getString())
                    rows.append(row)
                out.append({"type": "table", "rows": rows,
                            "paragraphs": Office._table_paragraphs(el)})
            elif el.supportsService("com.sun.star.text.Paragraph"):
                out.append(Office._paragraph(el))
        return out

    @staticmethod
    def _paragraph(el) -> dict:
        try:
            label = el.getPropertyValue("ListLabelString") or None
        except Exception:
            label = None
        return {"type": "paragraph", "text": el.getString(), "label": label}

    @staticmethod
    def _table_paragraphs(table) -> list:
        """Every paragraph of a table's cells in reading order (cell by cell as
        ``getCellNames`` lists them, nested tables opened where they stand)."""
        out = []
        for name in table.getCellNames():
            enum = table.getCellByName(name).getText().createEnumeration()
            while enum.hasMoreElements():
                el = enum.nextElement()
                if el.supportsService("com.sun.star.text.TextTable"):
                    out.extend(Office._table_paragraphs(el))
                elif el.supportsService("com.sun.star.text.Paragraph"):
                    out.append(Office._paragraph(el))
        return out

    @staticmethod
    def _comments(doc) -> list:
        out = []
        enum = doc.getTextFields().createEnumeration()
        while enum.hasMoreElements():
            f = enum.nextElement()
            if f.supportsService("com.sun.star.text.TextField.Annotation"):
                try:
                    anchor = f.getAnchor().getString()
                except Exception:
                    anchor = ""
                out.append({"author": f.getPropertyValue("Author"),
                            "content": f.getPropertyValue("Content"),
                            "anchor": anchor})
        return out

    @staticmethod
    def _user_properties(doc) -> dict:
        props = doc.getDocumentProperties().getUserDefinedProperties()
        out = {}
        for p in props.getPropertySetInfo().getProperties():
            value = props.getPropertyValue(p.Name)
            if isinstance(value, str):
                out[p.Name] = value
        return out

    def close(self) -> None:
        try:
            self.desktop.terminate()
        except Exception:
            pass
        try:
            self.proc.wait(timeout=30)
        except subprocess.TimeoutExpired:
            self.proc.kill()
            self.proc.wait()
        shutil.rmtree(self.work, ignore_errors=True)


def main() -> int:
    office = Office()
    try:
        print(json.dumps({"ok": True, "ready": True}), flush=True)
        for line in sys.stdin:
            line = line.strip()
            if not line:
                continue
            req = json.loads(line)
            if req.get("op") == "quit":
                break
            try:
                if req.get("op") != "inspect":
                    raise ValueError(f"unknown op {req.get('op')!r}")
                reply = office.inspect(req["path"], req.get("action", "none"), req.get("pdf"),
                                       req.get("save_as"))
            except Exception as err:  # report, keep serving
                reply = {"ok": False, "error": f"{type(err).__name__}: {err}",
                         "trace": traceback.format_exc()}
            print(json.dumps(reply), flush=True)
    finally:
        office.close()
    return 0


if __name__ == "__main__":
    sys.exit(main())
