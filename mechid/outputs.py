"""Where results may be written: checked before any analysis starts.

An analysis can run for minutes; an output path that turns out to be unwritable afterwards
loses that run, and an output path that names a file the run has read destroys the user's
data. :func:`check_output_paths` refuses both up front, naming the option and the path.
"""

from __future__ import annotations

import os
from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from pathlib import Path

from mechid.data import DATA_SUFFIXES
from mechid.errors import MechidError


class OutputPathError(MechidError):
    """An output path cannot be written, or would replace a file that was read."""


@dataclass(frozen=True)
class InputFiles:
    """Every file a run reads, and the data folder when the data came as one.

    Parameters
    ----------
    files : tuple of Path
        Data files and the device description actually read.
    data_folder : Path or None
        The folder whose data files were read (its data-suffixed files are all inputs of
        the next run too).
    """

    files: tuple[Path, ...]
    data_folder: Path | None = None


def input_files(data: Path, sources: Iterable[str], device_file: Path | None) -> InputFiles:
    """The files read for ``data`` (a file or a folder whose files are ``sources``)."""
    folder = data if data.is_dir() else None
    files = [folder / name for name in sources] if folder is not None else [data]
    if device_file is not None:
        files.append(device_file)
    return InputFiles(tuple(files), folder)


def _same_file(a: Path, b: Path) -> bool:
    try:
        return os.path.samefile(a, b)  # catches hard links and other spellings of one file
    except OSError:
        return a.resolve() == b.resolve()


def _check_file_destination(option: str, path: Path, inputs: InputFiles) -> None:
    if path.is_dir():
        raise OutputPathError(f"{option} {path}: is a folder; give a file name")
    for read in inputs.files:
        if _same_file(path, read):
            raise OutputPathError(f"{option} {path}: refusing to overwrite {read}, which this run reads")
    if (inputs.data_folder is not None and path.suffix.lower() in DATA_SUFFIXES
            and _same_file(path.parent, inputs.data_folder)):
        raise OutputPathError(
            f"{option} {path}: a {path.suffix} file in the data folder would be read as data by "
            "the next analysis of that folder; write it elsewhere"
        )
    _check_parent(option, path.parent)
    if path.exists() and not os.access(path, os.W_OK):
        raise OutputPathError(f"{option} {path}: the file exists and cannot be written")


def _check_parent(option: str, folder: Path) -> None:
    if not folder.exists():
        raise OutputPathError(f"{option}: the folder {folder} does not exist; create it first")
    if not folder.is_dir():
        raise OutputPathError(f"{option}: {folder} is not a folder")
    if not os.access(folder, os.W_OK | os.X_OK):
        raise OutputPathError(f"{option}: the folder {folder} cannot be written to")


def _check_folder_destination(option: str, folder: Path, inputs: InputFiles) -> None:
    if folder.exists() and not folder.is_dir():
        raise OutputPathError(f"{option} {folder}: exists and is not a folder")
    if folder.exists():
        _check_parent(option, folder)
    else:
        _check_parent(option, folder.parent)


def check_output_paths(files: Mapping[str, Path | None], folders: Mapping[str, Path | None],
                       inputs: InputFiles) -> None:
    """Refuse output paths that cannot be written or would replace an input.

    Parameters
    ----------
    files : mapping
        Option name (e.g. ``"--json"``) to the file it writes, or None when not asked for.
    folders : mapping
        Option name to the folder it writes into (created when missing; its parent must exist).
    inputs : InputFiles
        What the run reads (:func:`input_files`).

    Raises
    ------
    OutputPathError
        Naming the option and the path: a missing or unwritable folder, a folder given as a
        file, a path that is a file that was read (also through a hard link), a data-suffixed
        file inside the data folder, or two options writing the same file.
    """
    chosen = {option: path for option, path in files.items() if path is not None}
    for option, path in chosen.items():
        _check_file_destination(option, path, inputs)
    seen: dict[Path, str] = {}
    for option, path in chosen.items():
        key = path.resolve()
        if key in seen:
            raise OutputPathError(f"{seen[key]} and {option} both write {path}; give different files")
        seen[key] = option
    for option, folder in folders.items():
        if folder is not None:
            _check_folder_destination(option, folder, inputs)
