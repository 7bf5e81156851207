"""The demo project files shipped in the repository's `presets/` folder."""

from __future__ import annotations

from pathlib import Path

PRESET_DIR = Path(__file__).resolve().parent.parent / "presets"
DEMO_PRESET = "tray-lidder"


def preset_names() -> list[str]:
    """Preset names (file stems), sorted."""
    return sorted(p.stem for p in PRESET_DIR.glob("*.toml"))


def preset_path(name: str) -> Path:
    return PRESET_DIR / f"{name}.toml"
