"""The package as it is installed: a built wheel carries its templates, static files,
seed data and migrations, and serves pages from a fresh virtual environment."""

import re
import shutil
import socket
import subprocess
import sys
import sysconfig
import time
import tomllib
from pathlib import Path

import httpx
import pytest

ROOT = Path(__file__).resolve().parents[1]
PYPROJECT = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))


def test_every_folder_of_the_package_is_listed_for_the_wheel() -> None:
    listed = set(PYPROJECT["tool"]["setuptools"]["packages"])
    folders = {
        ".".join(path.parent.relative_to(ROOT).parts)
        for path in (ROOT / "service").rglob("*.py")
        if "__pycache__" not in path.parts
    }
    assert folders <= listed, sorted(folders - listed)
    mapped = PYPROJECT["tool"]["setuptools"]["package-dir"]
    assert mapped == {
        "service.templates": "templates",
        "service.static": "static",
        "service.seed_data": "seed_data",
    }


def _free_port() -> int:
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        port: int = probe.getsockname()[1]
    return port


@pytest.mark.slow
def test_a_built_wheel_serves_pages_from_a_fresh_environment(tmp_path: Path) -> None:
    # Built from a copy: setuptools leaves a build/ folder beside the sources it builds.
    source = tmp_path / "source"
    shutil.copytree(
        ROOT,
        source,
        ignore=shutil.ignore_patterns(
            ".venv", ".git", "build", "__pycache__", ".*_cache", ".hypothesis", "*.db*"
        ),
    )
    subprocess.run(
        [sys.executable, "-m", "pip", "wheel", str(source), "--no-deps", "-q", "-w", tmp_path],
        check=True,
        timeout=300,
    )
    (wheel,) = tmp_path.glob("traptally-*.whl")
    venv = tmp_path / "fresh"
    subprocess.run([sys.executable, "-m", "venv", str(venv)], check=True, timeout=120)
    python = venv / "bin" / "python"
    subprocess.run(
        [python, "-m", "pip", "install", "-q", "--no-deps", str(wheel)], check=True, timeout=300
    )
    # The dependencies come from this environment: a path line, which (unlike a .pth
    # file's import lines) brings in none of this checkout's editable install.
    site_packages = Path(
        subprocess.run(
            [python, "-c", "import sysconfig; print(sysconfig.get_paths()['purelib'])"],
            check=True,
            capture_output=True,
            text=True,
        ).stdout.strip()
    )
    (site_packages / "dependencies.pth").write_text(sysconfig.get_paths()["purelib"] + "\n")
    port = _free_port()
    workdir = tmp_path / "elsewhere"
    workdir.mkdir()
    server = subprocess.Popen(
        [venv / "bin" / "traptally", "serve", "--demo", "--port", str(port)],
        cwd=workdir,
        stdout=subprocess.PIPE,
        stderr=subprocess.STDOUT,
        text=True,
    )
    try:
        base = f"http://127.0.0.1:{port}"
        for _ in range(200):
            try:
                if httpx.get(f"{base}/api/v1/health", timeout=1.0).status_code == 200:
                    break
            except httpx.TransportError:
                time.sleep(0.1)
        sign_in = httpx.get(f"{base}/sign-in", timeout=5.0)
        assert sign_in.status_code == 200
        assert "Sign in" in sign_in.text
        assert httpx.get(f"{base}/static/traptally.css", timeout=5.0).status_code == 200
    finally:
        server.terminate()
        output, _ = server.communicate(timeout=30)
    assert "Demo plant loaded: Wrenfield Board Mill." in output
    installed = subprocess.run(
        [python, "-c", "import service; print(service.__file__)"],
        cwd=workdir,
        check=True,
        capture_output=True,
        text=True,
    ).stdout
    assert re.search(r"fresh/lib/python3\.\d+/site-packages/service/__init__\.py", installed)
