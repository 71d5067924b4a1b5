#!/usr/bin/env bash
# End-to-end test of the terminal workbook in a real pseudo-terminal.
#
#   tests/e2e/run.sh BINARY
#
# 1. Edit and save: open a copy of the turbojet demo at 80x24, move to the
#    compressor, set its pressure ratio to 12 in the process panel, save with
#    ctrl-s and quit with q; `BINARY eval --format json` must then show
#    pressure ratio 12 and a net thrust different from the original sheet's.
# 2. Hang-up: open a copy, make the same edit, send SIGHUP; the program must
#    exit by itself, leave the alternate screen and raw mode, and write
#    turbojet.ron.recovery beside the file. Reopening must offer the recovery.
# 3. Closed terminal: closed_terminal.py closes the pty master under unsaved
#    edits (saved, new and untitled workbooks; with and without a SIGHUP);
#    the program must exit within 2 s and the next start must offer the work.
#
# 4. Comments: the same edit on a commented copy of the turbojet; the saved
#    file differs from the original in the edited line only.
# 5. Build: a two-spool turbofan built from the blank template by keys only
#    (turbofan_keys.txt), saved; its eval equals the turbofan demo's.
#
# Uses python3 and tui-drive / ttykit.py kept beside this script (copies of
# the project's shared tools, so CI does not depend on them). Settings and
# the recent-files list go to a temporary folder, not the user's.
set -euo pipefail

if [ $# -ne 1 ]; then
  echo "usage: $0 BINARY" >&2
  exit 2
fi
BIN=$(realpath "$1")
HERE=$(cd "$(dirname "$0")" && pwd)
ROOT=$(cd "$HERE/../.." && pwd)
SHEET="$ROOT/sheets/turbojet.ron"
TMP=$(mktemp -d "${TMPDIR:-/tmp}/stationwise-e2e.XXXXXX")
trap 'rm -rf "$TMP"' EXIT
export XDG_CONFIG_HOME="$TMP/config" XDG_DATA_HOME="$TMP/data"
unset NO_COLOR
DRIVE=(python3 "$HERE/tui-drive" --size 80x24 --timeout 20)
# The keys that reach the compressor's pressure ratio in the panel: down to
# station 3, Tab into the panel, past the static-state and branch rows.
TO_PR='j j Tab j j'
failures=0
fail() {
  echo "FAIL: $*" >&2
  failures=$((failures + 1))
}
pass() { echo "ok: $*"; }

# Net thrust (N) and the compressor's pressure ratio of a sheet, from eval.
figures() {
  "$BIN" eval "$1" --format json | python3 -c '
import json, sys
d = json.load(sys.stdin)
pr = next(p for p in d["processes"] if p["name"] == "compressor")["figures"]["pressure_ratio"]
print(d["summary"]["thrust_net_n"], pr)'
}

# ------------------------------------------------------------------ case 1
mkdir -p "$TMP/save"
cp "$SHEET" "$TMP/save/turbojet.ron"
if "${DRIVE[@]}" --keys "$TO_PR Enter ctrl-u 1 2 Enter wait:recomputed ctrl-s wait:saved q" \
  --out "$TMP/save/screen.txt" -- "$BIN" "$TMP/save/turbojet.ron" 2>"$TMP/save/status.txt"; then
  pass "edit and save: keys sent"
else
  fail "edit and save: tui-drive failed: $(cat "$TMP/save/status.txt")"
fi
if grep -q "program exited with status 0" "$TMP/save/status.txt"; then
  pass "q quit the program (status 0) after the save"
else
  fail "the program did not quit on q: $(cat "$TMP/save/status.txt")"
fi
read -r thrust0 pr0 < <(figures "$SHEET")
read -r thrust1 pr1 < <(figures "$TMP/save/turbojet.ron")
if python3 -c "import sys; t0, t1, pr = map(float, sys.argv[1:]); sys.exit(0 if pr == 12 and abs(t1 - t0) > 1e-6 * abs(t0) else 1)" \
  "$thrust0" "$thrust1" "$pr1"; then
  pass "saved file: pressure ratio $pr1 (was $pr0), net thrust $thrust1 N (was $thrust0 N)"
else
  fail "saved file: pressure ratio $pr1, net thrust $thrust1 N (original $pr0, $thrust0 N)"
fi
if grep -q 'pressure_ratio: "12"' "$TMP/save/turbojet.ron"; then
  pass "the file keeps the value as typed"
else
  fail "the file lacks pressure_ratio: \"12\""
fi

# ------------------------------------------------------------------ case 2
mkdir -p "$TMP/hup"
cp "$SHEET" "$TMP/hup/turbojet.ron"
# A small pty driver: tui-drive sends keys but no signals.
if python3 - "$BIN" "$TMP/hup/turbojet.ron" "$TMP/hup/output.bin" <<'PY'; then
import fcntl, os, pty, re, select, signal, struct, sys, termios, time

binary, sheet, out = sys.argv[1:4]
pid, fd = pty.fork()
if pid == 0:
    fcntl.ioctl(0, termios.TIOCSWINSZ, struct.pack("HHHH", 24, 80, 0, 0))
    os.environ["TERM"] = "xterm-256color"
    os.execv(binary, [binary, sheet])

data = bytearray()

def pump(until, timeout):
    """Read output until `until` (bytes) appears, or EOF, or the timeout."""
    end = time.monotonic() + timeout
    while until is None or until not in data:
        left = end - time.monotonic()
        if left <= 0:
            return False
        r, _, _ = select.select([fd], [], [], min(left, 0.1))
        if not r:
            continue
        try:
            chunk = os.read(fd, 65536)
        except OSError:  # EIO: the program closed the terminal
            return until is None
        if not chunk:
            return until is None
        data.extend(chunk)
        if b"\x1b[6n" in chunk:  # answer a cursor-position query
            os.write(fd, b"\x1b[1;1R")
    return True

def die(msg):
    open(out, "wb").write(bytes(data))
    print(msg, file=sys.stderr)
    try:
        os.kill(pid, signal.SIGKILL)
    except ProcessLookupError:
        pass
    sys.exit(1)

if not pump(b"stations", 10):
    die("no first frame")
for key in ["j", "j", "\t", "j", "j", "\r", "\x15", "1", "2", "\r"]:
    os.write(fd, key.encode())
    time.sleep(0.05)
if not pump(b"recomputed", 10):
    die("the edit was not applied")
mark = len(data)
os.kill(pid, signal.SIGHUP)
pump(None, 10)
deadline = time.monotonic() + 5
while True:
    done, status = os.waitpid(pid, os.WNOHANG)
    if done:
        break
    if time.monotonic() > deadline:
        die("the program did not exit after SIGHUP")
    time.sleep(0.05)
open(out, "wb").write(bytes(data))
if not os.WIFEXITED(status):
    die(f"the program was killed by signal {os.WTERMSIG(status)} instead of exiting")
tail = bytes(data[mark:])
if b"\x1b[?1049l" not in tail:
    die("no leave-alternate-screen after SIGHUP")
if data.rfind(b"\x1b[?1049h") > data.rfind(b"\x1b[?1049l"):
    die("the output does not end outside the alternate screen")
# The terminal's line discipline is back in cooked mode (raw mode undone).
attrs = termios.tcgetattr(fd)
lflag = attrs[3]
if not (lflag & termios.ICANON and lflag & termios.ECHO):
    die("raw mode was not undone (ICANON/ECHO off)")
last = tail.rsplit(b"\x1b[?1049l", 1)[-1].decode(errors="replace")
last = re.sub(r"\x1b\[[0-9;?]*[A-Za-z]", "", last).strip()
print(f"exit status {os.WEXITSTATUS(status)}; the program said: {last}")
PY
  pass "SIGHUP: program exited, left the alternate screen, raw mode undone"
else
  fail "SIGHUP case (output kept in $TMP/hup/output.bin)"
fi
if [ -f "$TMP/hup/turbojet.ron.recovery" ] && grep -q 'pressure_ratio: "12"' "$TMP/hup/turbojet.ron.recovery"; then
  pass "recovery file written with the unsaved edit"
else
  fail "no turbojet.ron.recovery with the edit"
fi
if cmp -s "$SHEET" "$TMP/hup/turbojet.ron"; then
  pass "the workbook itself was not touched"
else
  fail "the workbook changed although it was never saved"
fi

# Reopen: the recovery is offered; y loads it as unsaved changes.
if "${DRIVE[@]}" --keys 'wait:recovery' --expect 'recovery file' \
  --out "$TMP/hup/reopen.txt" -- "$BIN" "$TMP/hup/turbojet.ron" 2>"$TMP/hup/reopen-status.txt"; then
  pass "reopening offers the recovery file"
else
  fail "reopening does not offer the recovery: $(cat "$TMP/hup/reopen.txt")"
fi
if "${DRIVE[@]}" --keys "wait:recovery y $TO_PR" --expect 'pressure_ratio = 12' --expect 'turbojet.ron *' \
  --out "$TMP/hup/loaded.txt" -- "$BIN" "$TMP/hup/turbojet.ron" 2>/dev/null; then
  pass "y loads the recovered edit, marked unsaved"
else
  fail "the recovered edit is not shown: $(cat "$TMP/hup/loaded.txt")"
fi

# ------------------------------------------------------------------ case 3
# The terminal itself closes (a dropped SSH link): the pty master is closed
# with unsaved edits, for a saved, a new and an untitled workbook, with the
# program leading the terminal's session (it also gets SIGHUP) and as a
# foreground job under a leader that ignores SIGHUP (it sees only the dead
# terminal). Exit within 2 s, recovery file written, offered on reopen.
for case in saved new untitled; do
  for role in leader member; do
    work="$TMP/closed-$case-$role"
    if out=$(python3 "$HERE/closed_terminal.py" "$BIN" "$SHEET" "$work" "$case" "$role" 2>&1); then
      pass "closed terminal: $out"
    else
      fail "closed terminal: $out"
      continue
    fi
    case "$case" in
      saved) reopen=("$work/turbojet.ron"); offer='recovery file' ;;
      new) reopen=("$work/fresh.ron"); offer='recover unsaved work for' ;;
      untitled) reopen=(); offer='recover the untitled workbook' ;;
    esac
    if XDG_CONFIG_HOME="$work/config" XDG_DATA_HOME="$work/data" "${DRIVE[@]}" --keys "wait:${offer// /\\s}" --expect "$offer" \
      --out "$work/reopen.txt" -- "$BIN" "${reopen[@]}" 2>/dev/null; then
      pass "closed terminal ($case/$role): reopening offers the recovery"
    else
      fail "closed terminal ($case/$role): reopening does not offer it: $(cat "$work/reopen.txt")"
    fi
    if [ "$case" != saved ]; then
      # Choosing the offer (the first entry) loads the edit, marked unsaved.
      if XDG_CONFIG_HOME="$work/config" XDG_DATA_HOME="$work/data" "${DRIVE[@]}" --keys "wait:${offer// /\\s} Enter $TO_PR" \
        --expect 'pressure_ratio = 12' --out "$work/loaded.txt" -- "$BIN" "${reopen[@]}" 2>/dev/null; then
        pass "closed terminal ($case/$role): the recovered edit is loaded"
      else
        fail "closed terminal ($case/$role): the recovered edit is not shown: $(cat "$work/loaded.txt")"
      fi
    fi
  done
done

# ------------------------------------------------------------------ case 4
# Comments survive an edit and a save from the terminal: the commented copy
# of the turbojet, the same edit as case 1; the saved file must differ from
# the original in the edited line only, every comment in its place.
mkdir -p "$TMP/comments"
cp "$ROOT/tests/data/commented_turbojet.ron" "$TMP/comments/turbojet.ron"
if "${DRIVE[@]}" --keys "$TO_PR Enter ctrl-u 1 2 Enter wait:recomputed ctrl-s wait:saved q" \
  --out "$TMP/comments/screen.txt" -- "$BIN" "$TMP/comments/turbojet.ron" 2>"$TMP/comments/status.txt"; then
  changed=$(diff "$ROOT/tests/data/commented_turbojet.ron" "$TMP/comments/turbojet.ron" | grep -c '^[<>]' || true)
  removed=$(diff "$ROOT/tests/data/commented_turbojet.ron" "$TMP/comments/turbojet.ron" | grep '^<' || true)
  added=$(diff "$ROOT/tests/data/commented_turbojet.ron" "$TMP/comments/turbojet.ron" | grep '^>' || true)
  if [ "$changed" -eq 2 ] && [[ "$removed" == *'pressure_ratio: "10"'* ]] && [[ "$added" == *'pressure_ratio: "12"'* ]]; then
    pass "comments: the save changed the edited line only ($(grep -c '//' "$TMP/comments/turbojet.ron") comment lines kept)"
  else
    fail "comments: the save changed more than the edited line: $(diff "$ROOT/tests/data/commented_turbojet.ron" "$TMP/comments/turbojet.ron" | head -20)"
  fi
else
  fail "comments: tui-drive failed: $(cat "$TMP/comments/status.txt")"
fi

# ------------------------------------------------------------------ case 5
# A two-spool separate-flow turbofan built by keys only from the blank
# template (the keys in turbofan_keys.txt, which tests/tui_build.rs checks
# against the same build driven without a terminal), saved with ctrl-s;
# `eval` of the saved file must give the turbofan demo's station values and
# summary to 1e-9 relative.
mkdir -p "$TMP/build"
KEYS=$(cat "$HERE/turbofan_keys.txt")
if python3 "$HERE/tui-drive" --size 80x24 --timeout 120 --delay 0.03 --keys "$KEYS wait:saved q" \
  --out "$TMP/build/screen.txt" -- "$BIN" "$TMP/build/built.ron" 2>"$TMP/build/status.txt"; then
  pass "build a turbofan by keys: $(wc -w <"$HERE/turbofan_keys.txt") key tokens sent"
else
  fail "build a turbofan by keys: tui-drive failed: $(cat "$TMP/build/status.txt"); screen: $(cat "$TMP/build/screen.txt")"
fi
if [ -f "$TMP/build/built.ron" ] && python3 - "$BIN" "$TMP/build/built.ron" "$ROOT/sheets/turbofan.ron" <<'PY'; then
import json, subprocess, sys
binary, built, demo = sys.argv[1:4]
def ev(path):
    out = subprocess.run([binary, "eval", path, "--format", "json"], capture_output=True, text=True)
    if out.returncode != 0:
        sys.exit(f"eval {path}: exit {out.returncode}: {out.stderr}")
    return json.loads(out.stdout)
a, b = ev(demo), ev(built)
sa = {s["name"]: s for s in a["stations"]}
sb = {s["name"]: s for s in b["stations"]}
n = 0
def close(x, y, what):
    global n
    if isinstance(x, (int, float)) and isinstance(y, (int, float)):
        if abs(x - y) > 1e-9 * max(abs(x), abs(y)):
            sys.exit(f"{what}: demo {x}, built {y}")
        n += 1
    elif x != y and not (isinstance(x, str) or isinstance(y, str)):
        sys.exit(f"{what}: demo {x}, built {y}")
for name, s in sa.items():
    if name not in sb:
        sys.exit(f"station {name} missing from the built workbook")
    for k, v in s.items():
        if k not in ("name", "via"):
            close(v, sb[name].get(k), f"station {name} {k}")
for k, v in a["summary"].items():
    close(v, b["summary"].get(k), f"summary {k}")
print(f"{n} values agree", file=sys.stderr)
PY
  pass "the built turbofan evaluates to the demo's numbers"
else
  fail "the built turbofan differs from the demo (see above)"
fi

if [ "$failures" -ne 0 ]; then
  echo "e2e: $failures failed" >&2
  exit 1
fi
echo "e2e: all passed"
