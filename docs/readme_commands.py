#!/usr/bin/env python3
"""Runs every command shown in the README's ```sh blocks, as shown, in a
scratch folder (with `potentials/` linked in and `chainwell` on PATH), and
fails on the first one that fails. `cargo test`, the `cargo run` demo and
the Python module's install and tests are CI steps of their own;
`cargo run --release --` is run as `chainwell`. A block that is a shell
script (starting with #!) is run once per job-array task it names
(SLURM_ARRAY_TASK_ID = 1..N).

Usage: python3 docs/readme_commands.py [path/to/chainwell]
"""
import os
import re
import subprocess
import sys
import tempfile

root = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
binary = os.path.abspath(sys.argv[1] if len(sys.argv) > 1 else os.path.join(root, "target/release/chainwell"))
readme = open(os.path.join(root, "README.md"), encoding="utf-8").read()
blocks = re.findall(r"```sh\n(.*?)```", readme, re.S)

scratch = tempfile.mkdtemp(prefix="chainwell-readme-")
os.symlink(os.path.join(root, "potentials"), os.path.join(scratch, "potentials"))
os.makedirs(os.path.join(scratch, "docs", "figures"))
bindir = os.path.join(scratch, ".bin")
os.makedirs(bindir)
os.symlink(binary, os.path.join(bindir, "chainwell"))
env = dict(os.environ, PATH=bindir + os.pathsep + os.environ["PATH"])


def run(cmd, extra_env=None):
    print("$", cmd, flush=True)
    r = subprocess.run(cmd, shell=True, cwd=scratch, env=dict(env, **(extra_env or {})),
                       stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    if r.returncode != 0:
        sys.exit(f"README command failed ({r.returncode}): {cmd}\n{r.stderr}")


count = 0
for block in blocks:
    if block.startswith("#!"):
        n = int(re.search(r"^N=(\d+)$", block, re.M).group(1))
        path = os.path.join(scratch, "script.sh")
        open(path, "w").write(block)
        for task in range(1, n + 1):
            run(f"sh {path}", {"SLURM_ARRAY_TASK_ID": str(task)})
        count += 1
        continue
    for cmd in block.replace("\\\n", " ").splitlines():
        cmd = cmd.split("  #")[0].strip()
        if not cmd or cmd.startswith("#"):
            continue
        if cmd.startswith("cargo test") or cmd.startswith("cargo run --release -- solve potentials/alternating_chain.toml"):
            continue
        # The Python module's install and tests are a CI step of their own.
        if cmd.startswith("pip install ./python") or cmd.startswith("python3 -m pytest python/tests"):
            continue
        cmd = cmd.replace("cargo run --release --", "chainwell")
        run(cmd)
        count += 1
print(f"{count} README commands ran")
