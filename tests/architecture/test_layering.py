"""The package keeps its layering: stages import one way, one package talks to the CAD
kernel, one package writes files.

Every module under ``soft_molds/`` is parsed with :mod:`ast`; nothing is imported or run.
The rules (DEVELOPERS.md, "Architecture"):

- stages, in order: recipe -> plan -> geometry -> analysis -> export. A stage module may
  import its own stage, earlier stages and the leaf modules; never a later stage or a
  driver;
- leaf modules (errors, units, meshdata, version, constants) import no stage and no driver;
- drivers (pipeline, cli, moldset, __init__, __main__ and sweep, module or package) may
  import any stage;
- only ``soft_molds/geometry/`` imports cadquery or OCP;
- only ``soft_molds/export/`` writes to the file system.

Every import counts, wherever it stands (inside a function, under ``TYPE_CHECKING``), and
so does ``importlib.import_module`` with a literal name. Relative imports are resolved
against the module's package. Each failing test lists every violation as ``file:line``.
The detectors themselves are tested on small snippets below, so a detector that stopped
seeing anything would fail here rather than pass silently.
"""

from __future__ import annotations

import ast
from collections.abc import Iterator
from dataclasses import dataclass
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
PACKAGE = "soft_molds"

STAGES = ("recipe", "plan", "geometry", "analysis", "export")
LEAVES = frozenset({"errors", "units", "meshdata", "version", "constants"})
DRIVERS = frozenset({"pipeline", "cli", "moldset", "__init__", "__main__", "sweep"})
KERNEL_PACKAGES = frozenset({"cadquery", "OCP"})
#: Modules and packages directly under soft_molds/; any other soft_molds.X is a name the
#: package's __init__ defines (``from soft_molds import load_recipe``).
TOP_LEVEL = frozenset(p.stem for p in (ROOT / PACKAGE).iterdir()
                      if p.suffix == ".py" or (p / "__init__.py").exists())


# --- reading modules ---------------------------------------------------------------------

@dataclass(frozen=True)
class Module:
    name: str        # dotted, e.g. soft_molds.geometry.kernel
    path: str        # relative to the repository root, for messages
    is_package: bool  # an __init__.py
    tree: ast.Module


def module_name(rel: Path) -> tuple[str, bool]:
    """Dotted name of the module at ``rel`` (a path relative to the repository root)."""
    parts = list(rel.with_suffix("").parts)
    is_package = parts[-1] == "__init__"
    if is_package:
        parts = parts[:-1]
    return ".".join(parts), is_package


def parse(source: str, name: str, path: str = "<snippet>", is_package: bool = False) -> Module:
    return Module(name, path, is_package, ast.parse(source, filename=path))


def package_modules(root: Path = ROOT) -> list[Module]:
    out = []
    for file in sorted((root / PACKAGE).rglob("*.py")):
        rel = file.relative_to(root)
        name, is_package = module_name(rel)
        out.append(parse(file.read_text(encoding="utf-8"), name, rel.as_posix(), is_package))
    return out


# --- imports -----------------------------------------------------------------------------

@dataclass(frozen=True)
class Import:
    target: str  # absolute dotted name
    line: int


def resolve_relative(module: Module, level: int, name: str | None) -> str:
    """The absolute name ``from <level dots><name> import ...`` refers to in ``module``."""
    package = module.name if module.is_package else module.name.rpartition(".")[0]
    parts = package.split(".")
    if level - 1 >= len(parts):
        raise ValueError(f"{module.path}: relative import beyond the top-level package")
    base = parts[: len(parts) - (level - 1)]
    return ".".join(base + ([name] if name else []))


def imports_of(module: Module) -> Iterator[Import]:
    """Every module ``module`` imports. ``from X import y`` yields ``X.y`` (y may be a
    submodule; for the rules below ``X.y`` lies in the same package as ``X``)."""
    for node in ast.walk(module.tree):
        if isinstance(node, ast.Import):
            for alias in node.names:
                yield Import(alias.name, node.lineno)
        elif isinstance(node, ast.ImportFrom):
            base = (resolve_relative(module, node.level, node.module) if node.level
                    else node.module or "")
            for alias in node.names:
                yield Import(base if alias.name == "*" else f"{base}.{alias.name}",
                             node.lineno)
        elif isinstance(node, ast.Call) and _is_dynamic_import(node):
            arg = node.args[0]
            if isinstance(arg, ast.Constant) and isinstance(arg.value, str):
                target = arg.value
                if target.startswith("."):
                    level = len(target) - len(target.lstrip("."))
                    target = resolve_relative(module, level, target.lstrip(".") or None)
                yield Import(target, node.lineno)


def _is_dynamic_import(node: ast.Call) -> bool:
    f = node.func
    named = ((isinstance(f, ast.Attribute) and f.attr == "import_module")
             or (isinstance(f, ast.Name) and f.id in {"import_module", "__import__"}))
    return named and bool(node.args)


# --- layers ------------------------------------------------------------------------------

def layer_of(name: str, target: bool = False) -> str | None:
    """'stage:<name>', 'leaf', 'driver', or None for a name outside the package. An
    imported ``soft_molds.X`` that is no module (``target``) is a name of the package."""
    parts = name.split(".")
    if parts[0] != PACKAGE:
        return None
    top = parts[1] if len(parts) > 1 else ""
    if len(parts) == 1 or (target and len(parts) == 2 and top not in TOP_LEVEL):
        return "driver"  # the package itself (its __init__) or a name it defines
    if top in STAGES:
        return f"stage:{top}"
    if top in LEAVES:
        return "leaf"
    if top in DRIVERS:
        return "driver"
    return "unplaced"


def layer_problem(importer: str, target: str) -> str | None:
    """Why ``importer`` may not import ``target`` (both absolute names), or None."""
    src, dst = layer_of(importer), layer_of(target, target=True)
    if src is None or dst is None:
        return None
    if src == "unplaced":
        return f"{importer} belongs to no stage, leaf or driver"
    if dst == "unplaced":
        return f"imports {target}, which belongs to no stage, leaf or driver"
    if src == "driver" or dst == "leaf":
        return None
    if src == "leaf":
        return f"leaf module imports {target} ({dst.replace('stage:', 'stage ')})"
    if dst == "driver":
        return f"stage {src[6:]} imports the driver {target}"
    s, d = STAGES.index(src[6:]), STAGES.index(dst[6:])
    if d > s:
        return (f"stage {src[6:]} imports {target} of the later stage {dst[6:]} "
                f"(order: {' -> '.join(STAGES)})")
    return None


def layering_violations(modules: list[Module]) -> list[str]:
    out = []
    for m in modules:
        if layer_of(m.name) == "unplaced":
            out.append(f"{m.path}:1: {m.name} belongs to no stage, leaf or driver")
            continue
        for imp in imports_of(m):
            problem = layer_problem(m.name, imp.target)
            if problem:
                out.append(f"{m.path}:{imp.line}: {problem}")
    return out


def kernel_import_violations(modules: list[Module]) -> list[str]:
    out = []
    for m in modules:
        if m.name == f"{PACKAGE}.geometry" or m.name.startswith(f"{PACKAGE}.geometry."):
            continue
        for imp in imports_of(m):
            if imp.target.split(".")[0] in KERNEL_PACKAGES:
                out.append(f"{m.path}:{imp.line}: imports {imp.target} outside "
                           f"{PACKAGE}/geometry/")
    return out


# --- file-system writes ------------------------------------------------------------------

#: Calls that create, change, move or remove files or directories, by qualified name.
WRITING_FUNCTIONS = frozenset({
    "os.replace", "os.rename", "os.renames", "os.remove", "os.unlink", "os.rmdir",
    "os.removedirs", "os.mkdir", "os.makedirs", "os.link", "os.symlink", "os.truncate",
    "os.mkfifo", "os.utime", "os.chmod",
    "shutil.copy", "shutil.copy2", "shutil.copyfile", "shutil.copytree", "shutil.move",
    "shutil.rmtree", "shutil.copymode", "shutil.copystat", "shutil.make_archive",
    "shutil.unpack_archive",
    "json.dump", "pickle.dump", "marshal.dump",
    "numpy.save", "numpy.savez", "numpy.savez_compressed", "numpy.savetxt",
    "tempfile.mkstemp", "tempfile.mkdtemp", "tempfile.NamedTemporaryFile",
    "tempfile.TemporaryFile", "tempfile.TemporaryDirectory",
    "logging.FileHandler", "logging.basicConfig",
    "matplotlib.pyplot.savefig", "matplotlib.pyplot.imsave",
    "cadquery.exporters.export", "cadquery.occ_impl.exporters.export",
})
#: The export package's own low-level writers: a module outside export that calls them
#: decides on its own to write a file (a driver asks export for a whole job instead).
EXPORT_WRITERS = frozenset({f"{PACKAGE}.export.files.write_atomic",
                            f"{PACKAGE}.export.files.write_file_set"})
#: Methods that write whatever object they are called on (paths, figures, canvases,
#: arrays, CAD shapes): flagged by name, since the receiver's type is unknown statically.
WRITING_METHODS = frozenset({
    "write_text", "write_bytes", "touch", "mkdir", "unlink", "rmdir", "symlink_to",
    "hardlink_to", "savefig", "print_figure", "print_png", "print_svg", "print_pdf",
    "imsave", "tofile", "exportStl", "exportStep", "exportBrep", "export_stl",
})
#: Functions that open a file, and where their mode argument stands (positional index).
OPENERS = {"open": 1, "io.open": 1, "codecs.open": 1, "os.fdopen": 1, "gzip.open": 1,
           "bz2.open": 1, "lzma.open": 1, "tarfile.open": 1, "zipfile.ZipFile": 1}
#: Flags of os.open that make a descriptor able to write.
WRITE_FLAGS = frozenset({"O_WRONLY", "O_RDWR", "O_CREAT", "O_APPEND", "O_TRUNC"})


def _aliases(module: Module) -> dict[str, str]:
    """Local name -> qualified name, from the module's import statements (relative ones
    resolved)."""
    out: dict[str, str] = {}
    for node in ast.walk(module.tree):
        if isinstance(node, ast.Import):
            for a in node.names:
                if a.asname:
                    out[a.asname] = a.name
                else:
                    out[a.name.split(".")[0]] = a.name.split(".")[0]
        elif isinstance(node, ast.ImportFrom):
            base = (resolve_relative(module, node.level, node.module) if node.level
                    else node.module or "")
            for a in node.names:
                out[a.asname or a.name] = f"{base}.{a.name}"
    return out


def _qualified(func: ast.expr, aliases: dict[str, str]) -> str | None:
    """``np.save`` -> ``numpy.save`` when the chain starts at an imported name; a bare
    name not imported is a builtin (``open`` -> ``open``)."""
    chain: list[str] = []
    while isinstance(func, ast.Attribute):
        chain.append(func.attr)
        func = func.value
    if not isinstance(func, ast.Name):
        return None
    if func.id in aliases:
        return ".".join([aliases[func.id], *reversed(chain)])
    return func.id if not chain else None


def _write_mode(mode: ast.expr | None) -> str | None:
    """Why an open mode may write ('w', 'a', 'x', '+'), or None for a read mode."""
    if mode is None:
        return None
    if isinstance(mode, ast.Constant) and isinstance(mode.value, str):
        return f"mode {mode.value!r}" if set(mode.value) & set("wax+") else None
    return "a mode that is not a literal"


def _mode_arg(call: ast.Call, index: int) -> ast.expr | None:
    for kw in call.keywords:
        if kw.arg == "mode":
            return kw.value
    return call.args[index] if len(call.args) > index else None


def _os_open_writes(call: ast.Call) -> bool:
    flags = call.args[1] if len(call.args) > 1 else None
    names = {n.attr if isinstance(n, ast.Attribute) else getattr(n, "id", "")
             for n in ast.walk(flags)} if flags is not None else set()
    return bool(names & WRITE_FLAGS) or not (
        isinstance(flags, ast.Attribute | ast.Name | ast.BinOp))


def write_calls(module: Module) -> Iterator[tuple[int, str]]:
    """(line, what) for every call in ``module`` that writes to the file system."""
    aliases = _aliases(module)
    for node in ast.walk(module.tree):
        if not isinstance(node, ast.Call):
            continue
        name = _qualified(node.func, aliases)
        method = node.func.attr if isinstance(node.func, ast.Attribute) else None
        if name in WRITING_FUNCTIONS:
            yield node.lineno, f"{name}()"
        elif name in EXPORT_WRITERS:
            yield node.lineno, f"{name.rpartition('.')[2]}() of {name.rpartition('.')[0]}"
        elif name == "os.open":
            if _os_open_writes(node):
                yield node.lineno, "os.open() with write flags"
        elif name in OPENERS:
            why = _write_mode(_mode_arg(node, OPENERS[name]))
            if why:
                yield node.lineno, f"{name}() with {why}"
        elif name in {"yaml.dump", "yaml.safe_dump", "yaml.dump_all"}:
            if len(node.args) > 1 or any(kw.arg == "stream" for kw in node.keywords):
                yield node.lineno, f"{name}() to a stream"
        elif method in WRITING_METHODS:
            yield node.lineno, f".{method}()"
        elif method == "open":
            # Path.open(mode): the mode is the first argument.
            why = _write_mode(_mode_arg(node, 0))
            if why:
                yield node.lineno, f".open() with {why}"
        elif method in {"replace", "rename"} and len(node.args) == 1 and not node.keywords:
            # Path.replace(target) / Path.rename(target); str.replace takes two arguments.
            yield node.lineno, f".{method}() of a path"


def write_violations(modules: list[Module]) -> list[str]:
    out = []
    for m in modules:
        if m.name == f"{PACKAGE}.export" or m.name.startswith(f"{PACKAGE}.export."):
            continue
        for line, what in write_calls(m):
            out.append(f"{m.path}:{line}: writes to the file system ({what}) outside "
                       f"{PACKAGE}/export/")
    return out


def _report(violations: list[str]) -> str:
    return f"{len(violations)} violation(s):\n" + "\n".join(violations)


# --- the package -------------------------------------------------------------------------

MODULES = package_modules()


def test_the_scan_reads_every_module_of_the_package():
    on_disk = sorted((ROOT / PACKAGE).rglob("*.py"))
    assert len(MODULES) == len(on_disk) > 30
    names = {m.name for m in MODULES}
    assert {"soft_molds", "soft_molds.geometry.kernel", "soft_molds.export.files"} <= names


def test_the_scan_sees_the_imports_and_writes_that_are_allowed():
    # Positive controls on the real tree: if these vanished, the detectors would be blind.
    kernel = next(m for m in MODULES if m.name == "soft_molds.geometry.kernel")
    assert any(i.target.startswith("cadquery") for i in imports_of(kernel))
    files = next(m for m in MODULES if m.name == "soft_molds.export.files")
    assert {"os.replace()", "os.open() with write flags"} <= {w for _, w in write_calls(files)}


def test_the_export_writers_named_here_exist():
    files = next(m for m in MODULES if m.name == f"{PACKAGE}.export.files")
    defined = {f"{files.name}.{n.name}" for n in files.tree.body
               if isinstance(n, ast.FunctionDef)}
    assert EXPORT_WRITERS <= defined


def test_stages_import_only_earlier_stages_and_leaf_modules():
    violations = layering_violations(MODULES)
    assert not violations, _report(violations)


def test_only_the_geometry_package_imports_the_cad_kernel():
    violations = kernel_import_violations(MODULES)
    assert not violations, _report(violations)


def test_only_the_export_package_writes_files():
    violations = write_violations(MODULES)
    assert not violations, _report(violations)


# --- the detectors on snippets -----------------------------------------------------------

def _imports(source: str, name: str, is_package: bool = False) -> list[str]:
    return [i.target for i in imports_of(parse(source, name, is_package=is_package))]


def test_relative_imports_resolve_against_the_package():
    assert _imports("from ..analysis import review\nfrom . import kernel\n"
                    "from .kernel import box\n", "soft_molds.geometry.mold") == [
        "soft_molds.analysis.review", "soft_molds.geometry.kernel",
        "soft_molds.geometry.kernel.box"]
    # In a package's __init__, '.' is the package itself.
    assert _imports("from .model import Recipe\n", "soft_molds.recipe", is_package=True) == [
        "soft_molds.recipe.model.Recipe"]
    assert _imports("from ...errors import Problem\n", "soft_molds.recipe.kinds.bar") == [
        "soft_molds.errors.Problem"]


def test_imports_inside_functions_and_dynamic_imports_are_seen():
    src = ("def f():\n    from soft_molds.export import stl\n"
           "    importlib.import_module('soft_molds.analysis.review')\n"
           "    import_module('.kinds', 'soft_molds.recipe')\n")
    assert _imports(src, "soft_molds.recipe.load") == [
        "soft_molds.export.stl", "soft_molds.analysis.review", "soft_molds.recipe.kinds"]


def test_stage_order_is_enforced_in_both_directions():
    def problems(src: str, name: str) -> list[str]:
        return layering_violations([parse(src, name, f"{name}.py")])

    assert problems("from ..export.stl import encode_binary_stl\n", "soft_molds.geometry.mold")
    assert problems("from soft_molds.plan import model\n", "soft_molds.recipe.load")
    assert problems("from soft_molds.pipeline import build\n", "soft_molds.analysis.review")
    assert problems("from soft_molds.recipe import model\n", "soft_molds.units")
    assert problems("import soft_molds.sweep\n", "soft_molds.errors")
    assert problems("from soft_molds.stuff import x\n", "soft_molds.geometry.mold")
    assert problems("import os\n", "soft_molds.odd_module")
    # Allowed: earlier stages, own stage, leaves, third-party, drivers importing anything.
    assert not problems("from ..recipe.model import Recipe\nfrom ..plan import model\n"
                        "from . import kernel\nfrom ..errors import GeometryError\n"
                        "import numpy\n", "soft_molds.geometry.mold")
    assert not problems("from .errors import Problem\n", "soft_molds.units")
    assert not problems("from .export.files import write_file_set\n"
                        "from .geometry import mold\n", "soft_molds.pipeline")
    assert not problems("from ..export import sheet\nimport soft_molds.analysis\n",
                        "soft_molds.sweep.runner")
    # The violation names the file and the line.
    [one] = problems("import numpy\n\nfrom ..analysis import rays\n", "soft_molds.recipe.load")
    assert one.startswith("soft_molds.recipe.load.py:3: stage recipe imports")


def test_kernel_imports_are_found_outside_geometry_only():
    def problems(src: str, name: str) -> list[str]:
        return kernel_import_violations([parse(src, name, f"{name}.py")])

    assert problems("import cadquery as cq\n", "soft_molds.sweep")
    assert problems("def f():\n    from OCP.BRep import BRep_Tool\n",
                    "soft_molds.analysis.section")
    assert problems("import importlib\nimportlib.import_module('cadquery')\n",
                    "soft_molds.sweep.worker")
    assert not problems("import cadquery\nfrom OCP.gp import gp_Pnt\n",
                        "soft_molds.geometry.kernel")
    assert not problems("import cadquery_like\nfrom .OCP import x\n", "soft_molds.export.stl")


def _writes(src: str) -> list[str]:
    return [w for _, w in write_calls(parse(src, "soft_molds.analysis.snippet"))]


def test_the_write_detector_finds_every_kind_of_write():
    cases = {
        "open(p, 'w')": "open() with mode 'w'",
        "open(p, mode='ab')": "open() with mode 'ab'",
        "open(p, 'r+')": "open() with mode 'r+'",
        "open(p, 'xb')": "open() with mode 'xb'",
        "open(p, m)": "open() with a mode that is not a literal",
        "import io\nio.open(p, 'wt')": "io.open() with mode 'wt'",
        "import os\nos.fdopen(fd, 'wb')": "os.fdopen() with mode 'wb'",
        "Path(p).open('w')": ".open() with mode 'w'",
        "p.open(mode='a')": ".open() with mode 'a'",
        "p.write_text(s)": ".write_text()",
        "p.write_bytes(b)": ".write_bytes()",
        "p.touch()": ".touch()",
        "out.mkdir(parents=True)": ".mkdir()",
        "tmp.unlink()": ".unlink()",
        "tmp.replace(final)": ".replace() of a path",
        "tmp.rename(final)": ".rename() of a path",
        "import os\nos.replace(a, b)": "os.replace()",
        "import os\nos.rename(a, b)": "os.rename()",
        "import os\nos.makedirs(d, exist_ok=True)": "os.makedirs()",
        "import os\nos.remove(p)": "os.remove()",
        "from os import replace\nreplace(a, b)": "os.replace()",
        "import os\nos.open(p, os.O_WRONLY | os.O_CREAT)": "os.open() with write flags",
        "import shutil\nshutil.copyfile(a, b)": "shutil.copyfile()",
        "import shutil as sh\nsh.move(a, b)": "shutil.move()",
        "import shutil\nshutil.rmtree(d)": "shutil.rmtree()",
        "import json\njson.dump(obj, fh)": "json.dump()",
        "from json import dump\ndump(obj, fh)": "json.dump()",
        "import pickle\npickle.dump(obj, fh)": "pickle.dump()",
        "import yaml\nyaml.safe_dump(doc, fh)": "yaml.safe_dump() to a stream",
        "import numpy as np\nnp.save(p, a)": "numpy.save()",
        "import numpy as np\nnp.savetxt(p, a)": "numpy.savetxt()",
        "a.tofile(p)": ".tofile()",
        "fig.savefig(p)": ".savefig()",
        "import matplotlib.pyplot as plt\nplt.savefig(p)": "matplotlib.pyplot.savefig()",
        "canvas.print_png(fh)": ".print_png()",
        "import tempfile\ntempfile.mkdtemp()": "tempfile.mkdtemp()",
        "from tempfile import NamedTemporaryFile\nNamedTemporaryFile()":
            "tempfile.NamedTemporaryFile()",
        "shape.exportStl(p)": ".exportStl()",
        "from ..export.files import write_atomic\nwrite_atomic(p, b)":
            "write_atomic() of soft_molds.export.files",
        "from soft_molds.export import files\nfiles.write_file_set(d, f)":
            "write_file_set() of soft_molds.export.files",
        "import cadquery as cq\ncq.exporters.export(s, p)": "cadquery.exporters.export()",
        "import zipfile\nzipfile.ZipFile(p, 'w')": "zipfile.ZipFile() with mode 'w'",
    }
    for src, want in cases.items():
        assert _writes(src) == [want], src


def test_the_write_detector_leaves_reads_and_in_memory_work_alone():
    quiet = [
        "open(p)", "open(p, 'rb')", "open(p, mode='r')", "Path(p).open()", "p.open('rb')",
        "p.read_text()", "p.read_bytes()", "'a-b'.replace('-', '_')", "s.replace(a, b)",
        "import dataclasses\ndataclasses.replace(r, parting=p)",
        "from dataclasses import replace\nreplace(r, parting=p)",
        "import json\njson.dumps(obj)", "import json\njson.load(fh)",
        "import yaml\nyaml.safe_dump(doc)", "import io\nio.BytesIO().write(b'x')",
        "import os\nos.open(d, os.O_RDONLY)", "import os\nos.path.exists(p)",
        "import numpy as np\nnp.load(p)", "import zipfile\nzipfile.ZipFile(p)",
        "import sys\nsys.stdout.write('x')",
    ]
    for src in quiet:
        assert _writes(src) == [], src


def test_a_write_is_reported_with_its_file_and_line_outside_export_only():
    src = "import json\n\n\ndef save(m, fh):\n    json.dump(m, fh)\n"
    [one] = write_violations([parse(src, "soft_molds.sweep", "soft_molds/sweep.py")])
    assert one.startswith("soft_molds/sweep.py:5: writes to the file system (json.dump())")
    assert write_violations([parse(src, "soft_molds.export.files",
                                   "soft_molds/export/files.py")]) == []
