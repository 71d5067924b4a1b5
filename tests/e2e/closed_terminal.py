#!/usr/bin/env python3
"""The terminal closes under the program with unsaved edits, as a dropped
SSH link does: the pty master is closed, reads on the terminal fail, and a
hang-up signal may or may not reach the program.

    closed_terminal.py BINARY SHEET WORKDIR CASE ROLE

CASE is saved (a workbook file that exists), new (a file name that does not
exist yet, started from the turbojet demo) or untitled (no file, started from
the demo). ROLE is leader (the program leads the terminal's session, so the
kernel also sends it SIGHUP) or member (a shell-like session leader that
ignores SIGHUP runs it in the foreground, so it sees only the dead terminal).

Checks: the program exits within 2 s of the close, writes the recovery file
with the edit, and the workbook file itself is untouched. Prints the
recovery file's path on success; exits 1 with a reason otherwise.
"""
import fcntl, os, pty, select, shutil, signal, struct, sys, termios, time

binary, sheet, work, case, role = sys.argv[1:6]
os.makedirs(work, exist_ok=True)
env = dict(os.environ)
env["XDG_CONFIG_HOME"] = os.path.join(work, "config")
env["XDG_DATA_HOME"] = os.path.join(work, "data")
env["TERM"] = "xterm-256color"
env.pop("NO_COLOR", None)

if case == "saved":
    book = os.path.join(work, "turbojet.ron")
    shutil.copy(sheet, book)
    args = [binary, book]
    recovery = book + ".recovery"
elif case == "new":
    book = os.path.join(work, "fresh.ron")
    args = [binary, book]
    recovery = book + ".recovery"
elif case == "untitled":
    book = None
    args = [binary]
    recovery = os.path.join(env["XDG_DATA_HOME"], "stationwise", "untitled.ron.recovery")
else:
    sys.exit(f"unknown case {case}")

pid, fd = pty.fork()
if pid == 0:
    fcntl.ioctl(0, termios.TIOCSWINSZ, struct.pack("HHHH", 24, 80, 0, 0))
    if os.environ.get("SW_E2E_STDERR"):
        err = os.open(os.path.join(work, "stderr.txt"), os.O_WRONLY | os.O_CREAT | os.O_TRUNC)
        os.dup2(err, 2)
    if role == "leader":
        os.execve(binary, args, env)
    # A session leader that ignores SIGHUP, as a shell with huponexit off
    # under a dying sshd may: the program is its foreground job.
    signal.signal(signal.SIGHUP, signal.SIG_IGN)
    signal.signal(signal.SIGTTOU, signal.SIG_IGN)
    child = os.fork()
    if child == 0:
        os.setpgid(0, 0)
        os.tcsetpgrp(0, os.getpid())
        signal.signal(signal.SIGHUP, signal.SIG_DFL)
        signal.signal(signal.SIGTTOU, signal.SIG_DFL)
        os.execve(binary, args, env)
    _, status = os.waitpid(child, 0)
    os._exit(os.waitstatus_to_exitcode(status) & 0xFF)

data = bytearray()


def pump(until, timeout):
    end = time.monotonic() + timeout
    while until not in data:
        left = end - time.monotonic()
        if left <= 0:
            return False
        r, _, _ = select.select([fd], [], [], min(left, 0.1))
        if not r:
            continue
        try:
            chunk = os.read(fd, 65536)
        except OSError:
            return False
        if not chunk:
            return False
        data.extend(chunk)
        if b"\x1b[6n" in chunk:
            os.write(fd, b"\x1b[1;1R")
    return True


def fail(msg):
    try:
        os.kill(pid, signal.SIGKILL)
    except ProcessLookupError:
        pass
    tail = bytes(data[-400:]).decode(errors="replace")
    sys.exit(f"{case}/{role}: {msg} (last output: {tail!r})")


def keys(seq):
    for k in seq:
        os.write(fd, k.encode())
        time.sleep(0.05)


if case == "saved":
    if not pump(b"stations", 10):
        fail("no first frame")
else:
    # The start screen: pick the turbojet demo.
    if not pump(b"turbojet", 10):
        fail("no start screen")
    # Demos are listed after any recent files; this case has none, so the
    # turbojet's row is its index in `stationwise new --list`.
    import subprocess
    listing = subprocess.run([binary, "new", "--list"], capture_output=True, text=True).stdout
    order = [l.split()[0] for l in listing.splitlines() if l.strip()]
    keys(["\x1b[B"] * order.index("turbojet") + ["\r"])
    if not pump(b"stations", 10):
        fail("the demo did not open")
keys(["j", "j", "\t", "j", "j", "\r", "\x15", "1", "2", "\r"])
if not pump(b"recomputed", 10):
    fail("the edit was not applied")
time.sleep(0.2)
closed = time.monotonic()
os.close(fd)
while True:
    done, status = os.waitpid(pid, os.WNOHANG)
    if done:
        break
    if time.monotonic() - closed > 5:
        fail("still running 5 s after the terminal closed")
    time.sleep(0.01)
took = time.monotonic() - closed
if took > 2.0:
    fail(f"took {took:.2f} s to exit after the terminal closed (limit 2 s)")
if os.WIFSIGNALED(status):
    fail(f"killed by signal {os.WTERMSIG(status)}")
if not os.path.isfile(recovery):
    fail(f"no recovery file at {recovery}")
if 'pressure_ratio: "12"' not in open(recovery).read():
    fail("the recovery file lacks the edit")
if case == "saved" and open(book, "rb").read() != open(sheet, "rb").read():
    fail("the workbook changed although it was never saved")
if case == "new" and os.path.exists(book):
    fail("the never-saved workbook was written")
print(f"{case}/{role}: exited {took:.2f} s after the close, status {os.waitstatus_to_exitcode(status)}; recovery {recovery}")
