"""The package's public surface: names listed in __all__ and nothing else leaks."""
import types

import calcdoc


def test_public_names_are_listed():
    public = {n for n in dir(calcdoc) if not n.startswith("_")}
    modules = {n for n in public if isinstance(getattr(calcdoc, n), types.ModuleType)}
    assert public - modules == set(calcdoc.__all__) - {"__version__"}


def test_library_use(tmp_path):
    from pathlib import Path

    demo = Path(__file__).resolve().parents[2] / "example_jobs" / "press_gas_spring.yaml"
    res = calcdoc.run(calcdoc.load(demo))
    paths = calcdoc.write(res, tmp_path, pdf=False)
    assert [p.suffix for p in paths] == [".json"]
