"""Shared test helpers: small scenes built in code."""

import copy
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from swingsim.scene import scene_from_dict  # noqa: E402

BASE = {
    "title": "test scene",
    "duration_s": 20.0,
    "crane": {"suspension_m": [0.0, 0.0, 40.0]},
    "rope": {"length_m": 10.0},
    "load": {"mass_kg": 1000.0},
}


def make_scene(update=None, **top):
    """A scene dict merged with ``update`` (nested dicts merge, lists replace)."""
    d = copy.deepcopy(BASE)

    def merge(a, b):
        for k, v in b.items():
            if isinstance(v, dict) and isinstance(a.get(k), dict):
                merge(a[k], v)
            else:
                a[k] = copy.deepcopy(v)

    merge(d, update or {})
    d.update(top)
    return scene_from_dict(d)


@pytest.fixture
def scene_factory():
    return make_scene
