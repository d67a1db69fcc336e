"""Phasewright from Python: save designs, run them and fetch their results with a personal access token.

Standard library only, plus numpy for loading arrays. Install with ``pip install ./clients/python`` or copy
this one file next to your notebook.

    import phasewright as pw

    server = pw.Workbench("http://127.0.0.1:5180", token="pwt_…")   # or PHASEWRIGHT_URL / PHASEWRIGHT_TOKEN
    project = server.projects()[0]
    revision = server.save_revision(project["id"], "my-design.json", message="wider window")
    run = server.start_run(project["id"], revision["number"])
    run = server.wait(project["id"], run["id"])                      # prints a progress line
    files = server.download(project["id"], run["id"], "results/")    # every file of the run
    phase_a = files.array("phase_a")                                 # numpy.ndarray
    server.fab_package(project["id"], run["id"], "results/fab.zip")

Every request the server refuses raises a :class:`RequestRefused` (or a subclass by status) whose message is
the server's own, with the fields to fix in ``details``.
"""

from __future__ import annotations

import copy
import io
import json
import mimetypes
import os
import socket
import sys
import time
import urllib.error
import urllib.parse
import urllib.request
import uuid
from pathlib import Path
from typing import IO, Any, Callable, Dict, Iterable, List, Mapping, Optional, Union

__all__ = [
    "Workbench",
    "RunFiles",
    "load_arrays",
    "PhasewrightError",
    "ServerUnreachable",
    "RequestRefused",
    "BadRequest",
    "TokenRejected",
    "NotAllowed",
    "NotFound",
    "Conflict",
    "RunDidNotSucceed",
    "WaitTimedOut",
]

__version__ = "0.1.0"

DEFAULT_URL = "http://127.0.0.1:5180"
FINISHED = ("succeeded", "failed", "cancelled")
#: Files are written in pieces of this many bytes, so a large run never sits in memory whole.
CHUNK_BYTES = 1 << 20

PathLike = Union[str, "os.PathLike[str]"]


# ---------------------------------------------------------------------------------------------------------
# Exceptions
# ---------------------------------------------------------------------------------------------------------


class PhasewrightError(Exception):
    """Anything this client raises on purpose."""


class ServerUnreachable(PhasewrightError):
    """No HTTP answer at all: wrong address, server stopped, network down."""


class RequestRefused(PhasewrightError):
    """The server answered with an error status. ``message`` is the server's own words.

    ``status`` is the HTTP status, ``details`` a dict of field → what to fix (may be empty), ``method`` and
    ``path`` the request that was refused.
    """

    def __init__(self, status: int, message: str, details: Optional[Mapping[str, str]], method: str, path: str):
        self.status = status
        self.message = message
        self.details: Dict[str, str] = dict(details or {})
        self.method = method
        self.path = path
        text = f"{message} ({status} on {method} {path})"
        # Fields the message does not name already, one per line.
        text += "".join(f"\n  {field}: {why}" for field, why in self.details.items() if f"{field}: {why}" not in message)
        super().__init__(text)


class BadRequest(RequestRefused):
    """400, 413, 415: the request itself needs fixing; ``details`` names the fields."""


class TokenRejected(RequestRefused):
    """401: the token is unknown, revoked or expired, or its account is disabled."""


class NotAllowed(RequestRefused):
    """403: the token's scope or your project role does not allow this."""


class NotFound(RequestRefused):
    """404: no such project, revision, run or file — or you are not a member of the project."""


class Conflict(RequestRefused):
    """409: not possible in the current state (e.g. a fab package while design-rule violations stand)."""


class RunDidNotSucceed(PhasewrightError):
    """:meth:`Workbench.wait` saw the run end as failed or cancelled. ``run`` is its last state."""

    def __init__(self, run: Mapping[str, Any]):
        self.run = dict(run)
        why = run.get("error") or "no reason given"
        super().__init__(f"Run {run.get('id')} {run.get('status')}: {why}")


class WaitTimedOut(PhasewrightError):
    """:meth:`Workbench.wait` gave up; the run goes on on the server. ``run`` is the last state seen."""

    def __init__(self, run: Mapping[str, Any], seconds: float):
        self.run = dict(run)
        super().__init__(
            f"Run {run.get('id')} was still {run.get('status')} ({_percent(run)}, {run.get('stage') or 'no stage'}) "
            f"after {seconds:g} s; it goes on on the server — wait again or cancel it"
        )


_BY_STATUS = {400: BadRequest, 413: BadRequest, 415: BadRequest, 401: TokenRejected, 403: NotAllowed, 404: NotFound, 409: Conflict}


class _NoRedirect(urllib.request.HTTPRedirectHandler):
    """The API never redirects; following one could carry the token to another host."""

    def redirect_request(self, req, fp, code, msg, headers, newurl):  # noqa: D401 - urllib's signature
        raise ServerUnreachable(
            f"{req.get_full_url()} redirected ({code}) to {newurl}; give that address as the server URL instead"
        )


# ---------------------------------------------------------------------------------------------------------
# The client
# ---------------------------------------------------------------------------------------------------------


class Workbench:
    """One Phasewright server, reached with one personal access token.

    ``url``: the server's address (default ``$PHASEWRIGHT_URL``, else http://127.0.0.1:5180).
    ``token``: a personal access token ``pwt_…`` from Settings → Access tokens (default
    ``$PHASEWRIGHT_TOKEN``). A ``read`` token can list, wait and download; saving and running need ``write``.
    ``timeout``: seconds one HTTP request may take.
    """

    def __init__(self, url: Optional[str] = None, token: Optional[str] = None, timeout: float = 60.0):
        url = url or os.environ.get("PHASEWRIGHT_URL") or DEFAULT_URL
        token = token if token is not None else os.environ.get("PHASEWRIGHT_TOKEN")
        if not token:
            raise PhasewrightError(
                "No access token: pass token='pwt_…' or set PHASEWRIGHT_TOKEN (create one under Settings → Access tokens)"
            )
        parts = urllib.parse.urlsplit(url)
        if parts.scheme not in ("http", "https") or not parts.netloc:
            raise PhasewrightError(f"The server URL must look like http://host:port, not {url!r}")
        self.url = url.rstrip("/")
        self.timeout = timeout
        self._token = token.strip()
        self._opener = urllib.request.build_opener(_NoRedirect)

    def __repr__(self) -> str:
        return f"Workbench({self.url!r}, token='{self._token[:10]}…')"

    # -- HTTP ------------------------------------------------------------------------------------------

    def _open(self, method: str, path: str, body: Optional[bytes] = None, content_type: Optional[str] = None, query: Optional[Mapping[str, Any]] = None):
        """Sends one request and returns the open response; raises the matching error for any 4xx/5xx."""
        full_path = "/api" + path
        if query:
            pairs = {k: v for k, v in query.items() if v is not None}
            if pairs:
                full_path += "?" + urllib.parse.urlencode(pairs)
        headers = {
            "Authorization": f"Bearer {self._token}",
            "Accept": "application/json",
            "User-Agent": f"phasewright-python/{__version__}",
        }
        if content_type:
            headers["Content-Type"] = content_type
        request = urllib.request.Request(self.url + full_path, data=body, headers=headers, method=method)
        try:
            return self._opener.open(request, timeout=self.timeout)
        except urllib.error.HTTPError as error:
            raise _refusal(error, method, full_path) from None
        except urllib.error.URLError as error:
            raise ServerUnreachable(f"No answer from {self.url} ({error.reason}); is the server running at that address?") from None
        except (socket.timeout, TimeoutError, ConnectionError) as error:
            raise ServerUnreachable(f"No answer from {self.url} within {self.timeout:g} s ({error})") from None

    def _json(self, method: str, path: str, payload: Any = None, query: Optional[Mapping[str, Any]] = None) -> Any:
        body = None if payload is None else json.dumps(payload).encode("utf-8")
        with self._open(method, path, body, "application/json" if body is not None else None, query) as response:
            return json.loads(response.read().decode("utf-8") or "null")

    def _save(self, path: str, target: Path, query: Optional[Mapping[str, Any]] = None) -> Path:
        """Streams a GET answer into `target` (through a temporary name, so a broken download leaves no file)."""
        target.parent.mkdir(parents=True, exist_ok=True)
        partial = target.with_name(target.name + ".part")
        try:
            with self._open("GET", path, query=query) as response, open(partial, "wb") as out:
                while True:
                    chunk = response.read(CHUNK_BYTES)
                    if not chunk:
                        break
                    out.write(chunk)
            os.replace(partial, target)
        finally:
            if partial.exists():
                partial.unlink()
        return target

    # -- projects ----------------------------------------------------------------------------------------

    def projects(self, search: Optional[str] = None, status: str = "active") -> List[dict]:
        """Your projects (newest change first): dicts with ``id``, ``name``, ``myRole``, … .
        ``status``: ``active``, ``archived`` or ``all``; ``search`` filters by name."""
        return self._json("GET", "/projects", query={"q": search, "status": status})["projects"]

    def project(self, project_id: int) -> dict:
        return self._json("GET", f"/projects/{int(project_id)}")["project"]

    def create_project(self, name: str, description: str = "") -> dict:
        """A new project with you as its owner (needs a ``write`` token)."""
        return self._json("POST", "/projects", {"name": name, "description": description})["project"]

    # -- designs -----------------------------------------------------------------------------------------

    def revisions(self, project_id: int) -> List[dict]:
        """The project's saved revisions, newest first (without their designs)."""
        return self._json("GET", f"/projects/{int(project_id)}/revisions")["revisions"]

    def revision(self, project_id: int, number: int) -> dict:
        """One revision with its ``design`` (defaults filled in)."""
        return self._json("GET", f"/projects/{int(project_id)}/revisions/{int(number)}")["revision"]

    def upload(self, project_id: int, path: PathLike, kind: str = "image") -> dict:
        """Uploads a picture (``kind="image"``: PNG or JPEG) or a phase map (``kind="phase-map"``: .npy, PNG or
        JPEG) to the project; a design refers to it as ``{"source": "upload", "id": upload["id"]}``."""
        path = Path(path)
        data = path.read_bytes()
        boundary = f"phasewright-{uuid.uuid4().hex}"
        mime = "application/x-npy" if path.suffix.lower() == ".npy" else (mimetypes.guess_type(path.name)[0] or "application/octet-stream")
        name = path.name.replace('"', "_").replace("\r", "_").replace("\n", "_")
        body = b"".join(
            [
                f'--{boundary}\r\nContent-Disposition: form-data; name="kind"\r\n\r\n{kind}\r\n'.encode("utf-8"),
                f'--{boundary}\r\nContent-Disposition: form-data; name="file"; filename="{name}"\r\nContent-Type: {mime}\r\n\r\n'.encode("utf-8"),
                data,
                f"\r\n--{boundary}--\r\n".encode("utf-8"),
            ]
        )
        with self._open("POST", f"/projects/{int(project_id)}/uploads", body, f"multipart/form-data; boundary={boundary}") as response:
            return json.loads(response.read().decode("utf-8"))["upload"]

    def save_revision(self, project_id: int, design: Union[Mapping[str, Any], PathLike], message: str = "", base_dir: Optional[PathLike] = None) -> dict:
        """Saves the next revision of the project from a design dict or a design JSON file
        (``phasewright-design/1``, as ``phasewright run`` reads). Returns the revision (``number``, …).

        Pictures and phase maps the design names as files on disk (``{"source": "file", "path": …}``) are
        uploaded first and referred to by their upload, so a command-line design file works as it is; paths
        are relative to the file's folder (for a dict: ``base_dir``, default the working folder). The dict you
        pass is not changed.
        """
        if isinstance(design, Mapping):
            body = copy.deepcopy(dict(design))
            folder = Path(base_dir) if base_dir is not None else Path.cwd()
        else:
            file = Path(design)
            try:
                body = json.loads(file.read_text(encoding="utf-8"))
            except json.JSONDecodeError as error:
                raise PhasewrightError(f"{file} is not valid JSON: {error}") from None
            if not isinstance(body, dict):
                raise PhasewrightError(f"{file} must hold one JSON object (a design), not {type(body).__name__}")
            folder = Path(base_dir) if base_dir is not None else file.parent
        self._upload_files(int(project_id), body, folder)
        return self._json("POST", f"/projects/{int(project_id)}/revisions", {"design": body, "message": message})["revision"]

    def _upload_files(self, project_id: int, design: dict, folder: Path) -> None:
        uploaded: Dict[tuple, int] = {}
        channels = design.get("channels") if isinstance(design.get("channels"), dict) else {}
        for channel in ("a", "b"):
            terms = channels.get(channel, {}).get("terms") if isinstance(channels.get(channel), dict) else None
            for term in terms if isinstance(terms, list) else []:
                if not isinstance(term, dict):
                    continue
                for key, kind in (("image", "image"), ("phaseMap", "phase-map")):
                    ref = term.get(key)
                    if isinstance(ref, dict) and ref.get("source") == "file" and isinstance(ref.get("path"), str):
                        path = (folder / ref["path"]).resolve()
                        if not path.is_file():
                            raise PhasewrightError(f"channels.{channel}: the design names {ref['path']!r}, but {path} is not a file")
                        if (path, kind) not in uploaded:
                            uploaded[(path, kind)] = self.upload(project_id, path, kind)["id"]
                        term[key] = {"source": "upload", "id": uploaded[(path, kind)]}

    # -- runs --------------------------------------------------------------------------------------------

    def start_run(self, project_id: int, revision_number: int) -> dict:
        """Queues a run of a saved revision; returns the run (``id``, ``status`` "queued", …)."""
        return self._json("POST", f"/projects/{int(project_id)}/revisions/{int(revision_number)}/runs")["run"]

    def runs(self, project_id: int, status: str = "all", revision: Optional[int] = None) -> List[dict]:
        """The project's runs, newest first (summaries with ``headline`` figures)."""
        return self._json("GET", f"/projects/{int(project_id)}/runs", query={"status": status, "revision": revision})["runs"]

    def run(self, project_id: int, run_id: int) -> dict:
        """One run: ``status``, ``progress`` 0…1, ``stage``, ``metrics``, ``artifacts`` (its files), … ."""
        return self._json("GET", f"/projects/{int(project_id)}/runs/{int(run_id)}")["run"]

    def cancel_run(self, project_id: int, run_id: int) -> dict:
        return self._json("POST", f"/projects/{int(project_id)}/runs/{int(run_id)}/cancel")["run"]

    def wait(
        self,
        project_id: int,
        run_id: int,
        timeout: Optional[float] = None,
        poll: float = 1.0,
        progress: Union[bool, IO[str], Callable[[dict], None]] = True,
        check: bool = True,
    ) -> dict:
        """Waits until the run has finished and returns it.

        ``progress``: True prints one line that updates in place on stderr (``run 12 · running · 45 % ·
        retrieving channel A · 3 s``); a text stream prints there instead; a function is called with each
        state seen; False is silent. ``check``: raise :class:`RunDidNotSucceed` when the run failed or was
        cancelled. ``timeout`` (s): raise :class:`WaitTimedOut` after it (the run goes on on the server).
        Interrupting the wait (Ctrl-C, the notebook's stop button) leaves the run going as well.
        """
        report = _progress_reporter(progress)
        started = time.monotonic()
        while True:
            run = self.run(project_id, run_id)
            report(run, time.monotonic() - started, run["status"] in FINISHED)
            if run["status"] in FINISHED:
                break
            if timeout is not None and time.monotonic() - started >= timeout:
                raise WaitTimedOut(run, timeout)
            time.sleep(poll)
        if check and run["status"] != "succeeded":
            raise RunDidNotSucceed(run)
        return run

    # -- files -------------------------------------------------------------------------------------------

    def download(self, project_id: int, run_id: int, folder: PathLike, names: Optional[Iterable[str]] = None) -> "RunFiles":
        """Saves the run's files (all of them, or only ``names``) into ``folder`` under their own names and
        returns a :class:`RunFiles` over that folder. A name without a suffix means its ``.npy``
        (``"phase_a"`` → ``phase_a.npy``)."""
        run = self.run(project_id, run_id)
        available = {a["name"] for a in run["artifacts"]}
        if not available:
            why = "its files were deleted" if run.get("filesDeletedAt") else f"it is {run['status']}"
            raise PhasewrightError(f"Run {run_id} has no files ({why})")
        wanted = sorted(available) if names is None else [_npy_name(n) for n in names]
        missing = [n for n in wanted if n not in available]
        if missing:
            raise PhasewrightError(f"Run {run_id} has no file {', '.join(missing)}; it has {', '.join(sorted(available))}")
        folder = Path(folder)
        for name in wanted:
            self._save(f"/projects/{int(project_id)}/runs/{int(run_id)}/artifacts/{urllib.parse.quote(name)}", folder / _plain_name(name))
        return RunFiles(folder)

    def array(self, project_id: int, run_id: int, name: str):
        """One ``.npy`` file of the run, loaded into memory with numpy (nothing written to disk)."""
        import numpy

        path = f"/projects/{int(project_id)}/runs/{int(run_id)}/artifacts/{urllib.parse.quote(_npy_name(name))}"
        with self._open("GET", path) as response:
            return numpy.load(io.BytesIO(response.read()), allow_pickle=False)

    def fab_package(
        self,
        project_id: int,
        run_id: int,
        path: PathLike,
        layer: Optional[int] = None,
        datatype: Optional[int] = None,
        db_unit_nm: Optional[float] = None,
    ) -> Path:
        """Saves the run's fab package (zip: GDSII, arrays, previews, report) to ``path``; a folder gets the
        name ``fab-package-run<id>.zip``. ``layer``, ``datatype`` and ``db_unit_nm`` regenerate the GDSII with
        other values. Raises :class:`Conflict` while design-rule violations stand without an owner's override."""
        target = Path(path)
        if target.is_dir():
            target = target / f"fab-package-run{int(run_id)}.zip"
        query = {"layer": layer, "datatype": datatype, "dbUnitNm": None if db_unit_nm is None else f"{db_unit_nm:g}"}
        return self._save(f"/projects/{int(project_id)}/runs/{int(run_id)}/fab-package.zip", target, query)


class RunFiles:
    """A folder of a run's downloaded files. ``array("phase_a")`` loads ``phase_a.npy`` with numpy;
    ``arrays()`` loads every ``.npy``; ``json("metrics")`` reads ``metrics.json``; ``path(name)`` is a file's path."""

    def __init__(self, folder: PathLike):
        self.folder = Path(folder)

    def __repr__(self) -> str:
        return f"RunFiles({str(self.folder)!r}: {', '.join(self.names())})"

    def names(self) -> List[str]:
        return sorted(p.name for p in self.folder.iterdir() if p.is_file() and not p.name.endswith(".part"))

    def path(self, name: str) -> Path:
        path = self.folder / _plain_name(name)
        if not path.is_file():
            raise PhasewrightError(f"{path} does not exist; this folder holds {', '.join(self.names()) or 'nothing'}")
        return path

    def array(self, name: str):
        import numpy

        return numpy.load(self.path(_npy_name(name)), allow_pickle=False)

    def arrays(self) -> Dict[str, Any]:
        return load_arrays(self.folder)

    def json(self, name: str) -> Any:
        stem = name if name.endswith(".json") else name + ".json"
        return json.loads(self.path(stem).read_text(encoding="utf-8"))


def load_arrays(folder: PathLike) -> Dict[str, Any]:
    """Every ``.npy`` in ``folder`` loaded with numpy, by name without the suffix (``{"phase_a": array, …}``)."""
    import numpy

    return {p.stem: numpy.load(p, allow_pickle=False) for p in sorted(Path(folder).glob("*.npy"))}


# ---------------------------------------------------------------------------------------------------------
# Helpers
# ---------------------------------------------------------------------------------------------------------


def _refusal(error: urllib.error.HTTPError, method: str, path: str) -> PhasewrightError:
    raw = error.read()
    message, details = None, None
    try:
        body = json.loads(raw.decode("utf-8"))
        if isinstance(body, dict) and isinstance(body.get("error"), str):
            message = body["error"]
            details = body.get("details") if isinstance(body.get("details"), dict) else None
    except (ValueError, UnicodeDecodeError):
        pass
    if message is None:
        text = raw.decode("utf-8", "replace").strip()[:200]
        message = f"HTTP {error.code} {error.reason}" + (f": {text}" if text else "")
    cls = _BY_STATUS.get(error.code, RequestRefused)
    return cls(error.code, message, details, method, path)


def _npy_name(name: str) -> str:
    return name if "." in name else name + ".npy"


def _plain_name(name: str) -> str:
    """A file name the server gave, checked so that it cannot leave the download folder."""
    if not name or name in (".", "..") or "/" in name or "\\" in name or "\0" in name:
        raise PhasewrightError(f"Refusing to write a file named {name!r}")
    return name


def _percent(run: Mapping[str, Any]) -> str:
    return f"{100 * float(run.get('progress') or 0):.0f} %"


def _progress_line(run: Mapping[str, Any], seconds: float) -> str:
    parts = [f"run {run.get('id')}", str(run.get("status")), _percent(run)]
    stage = run.get("stage")
    if stage and run.get("status") == "running":
        parts.append(str(stage))
    parts.append(f"{seconds:.0f} s")
    return " · ".join(parts)


def _progress_reporter(progress: Union[bool, IO[str], Callable[[dict], None]]) -> Callable[[dict, float, bool], None]:
    if progress is False or progress is None:
        return lambda run, seconds, done: None
    if callable(progress) and not hasattr(progress, "write"):
        return lambda run, seconds, done: progress(run)
    stream: IO[str] = sys.stderr if progress is True else progress  # type: ignore[assignment]
    width = [0]

    def report(run: dict, seconds: float, done: bool) -> None:
        line = _progress_line(run, seconds)
        # One line rewritten in place: \r returns to its start, spaces cover a longer previous line.
        stream.write("\r" + line.ljust(width[0]) + ("\n" if done else ""))
        stream.flush()
        width[0] = len(line)

    return report
