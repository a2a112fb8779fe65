"""Builds the Python module `lapwing` with CMake for setuptools (pyproject.toml): `pip install
--no-build-isolation .` in a virtual environment (README, "In Python").

The module is CMake's target lapwing_python (-DLAPWING_PYTHON=ON, the library alone: no command
line, tests or install rules), built for the interpreter that runs pip, and copied to where
setuptools packs it. Build files go under build-python/ (the CMake presets own build/).
"""
import os
import pathlib
import re
import shutil
import subprocess
import sys

from setuptools import Extension, setup
from setuptools.command.build_ext import build_ext

ROOT = pathlib.Path(__file__).resolve().parent


class CMakeModule(Extension):
    def __init__(self, name):
        super().__init__(name, sources=[])


class CMakeBuild(build_ext):
    def build_extension(self, ext):
        build = pathlib.Path(self.build_temp).resolve() / "cmake"
        subprocess.run(["cmake", "-S", str(ROOT), "-B", str(build), "-DCMAKE_BUILD_TYPE=Release",
                        "-DLAPWING_PYTHON=ON", "-DLAPWING_BUILD_CLI=OFF",
                        "-DLAPWING_BUILD_TESTS=OFF", "-DLAPWING_INSTALL=OFF",
                        f"-DPython3_EXECUTABLE={sys.executable}"], check=True)
        # Two jobs unless CMAKE_BUILD_PARALLEL_LEVEL says otherwise (a small machine's cores).
        jobs = os.environ.get("CMAKE_BUILD_PARALLEL_LEVEL", "2")
        subprocess.run(["cmake", "--build", str(build), "--target", "lapwing_python", "-j", jobs],
                       check=True)
        (built,) = (build / "python").glob("lapwing*" + (self.get_ext_filename("x")[1:]))
        target = pathlib.Path(self.get_ext_fullpath(ext.name))
        target.parent.mkdir(parents=True, exist_ok=True)
        shutil.copyfile(built, target)


# The version is the CMake project's (one home).
version = re.search(r"project\(lapwing VERSION ([0-9.]+)",
                    (ROOT / "CMakeLists.txt").read_text()).group(1)

# The module is the only thing packed: no Python packages to discover (src/ holds C++).
setup(version=version, packages=[], py_modules=[], ext_modules=[CMakeModule("lapwing")],
      cmdclass={"build_ext": CMakeBuild}, options={"build": {"build_base": "build-python"}})
