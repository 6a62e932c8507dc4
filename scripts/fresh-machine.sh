#!/usr/bin/env bash
# A fresh machine of the kind the project runs on, to prove the README's two commands do all the
# set-up: a Debian 12 root made by debootstrap (with Debian's python3, git and g++, nothing else),
# this machine's Node and npm copied in, the committed checkout cloned into it, and then, as root with
# CI=true and no stdin, `npm install && npm start` (the served app must answer) and
# `npm install && npm test`. Prints each step's time and the test run's closing lines.
#
# Needs root, debootstrap, unshare and chroot, and the network to Debian's mirror and npm's registry.
# The debootstrap root is made once and kept under FALCIFORM_FRESH_DIR (default
# /var/tmp/falciform-fresh/base-root); every run copies it, so each run starts fresh. Only committed
# work is cloned. Usage: bash scripts/fresh-machine.sh   (about 15 min for the first root, then the
# install and the whole test suite on top.)
set -euo pipefail
checkout="$(cd "$(dirname "$0")/.." && pwd)"
dir="${FALCIFORM_FRESH_DIR:-/var/tmp/falciform-fresh}"
base="$dir/base-root"
root="$dir/run-root"

[ "$(id -u)" = 0 ] || { echo "fresh-machine.sh needs root (debootstrap, unshare, chroot): run it with sudo" >&2; exit 2; }
for tool in debootstrap unshare chroot git; do
  command -v "$tool" >/dev/null || { echo "fresh-machine.sh needs $tool: apt-get install --no-install-recommends debootstrap util-linux git" >&2; exit 2; }
done

# This machine's Debian mirror, as apt is configured here (deb822 or one-line form).
mirror="$(grep -hoE '^URIs: *[^ ]+' /etc/apt/sources.list.d/*.sources 2>/dev/null | head -1 | sed 's/^URIs: *//' || true)"
[ -n "$mirror" ] || mirror="$(grep -hoE '^deb +(\[[^]]*\] +)?[^ ]+' /etc/apt/sources.list 2>/dev/null | head -1 | awk '{print $NF}' || true)"
mirror="${mirror:-http://deb.debian.org/debian}"

step_start=0
begin() { step_start=$(date +%s); echo "== $1"; }
took() { echo "   ($(( $(date +%s) - step_start )) s)"; }

mkdir -p "$dir"
if [ ! -x "$base/usr/bin/python3" ]; then
  begin "debootstrap Debian 12 (bookworm) from $mirror into $base"
  rm -rf "$base"
  debootstrap --variant=minbase --include=python3,git,g++,make,ca-certificates bookworm "$base" "$mirror" >"$dir/debootstrap.log" 2>&1 \
    || { echo "debootstrap failed; see $dir/debootstrap.log" >&2; exit 1; }
  took
fi

begin "copy the base root, this machine's Node $(node --version) and npm $(npm --version), and the checkout"
rm -rf "$root"
cp -a "$base" "$root"
# The same mirrors as this machine (main, updates and security), instead of debootstrap's one line.
if ls /etc/apt/sources.list.d/*.sources >/dev/null 2>&1; then
  rm -f "$root/etc/apt/sources.list"
  cp /etc/apt/sources.list.d/*.sources "$root/etc/apt/sources.list.d/"
fi
cp /etc/resolv.conf "$root/etc/resolv.conf"
# This machine's TLS trust (local CAs, such as a proxy's), as every machine of its kind has it.
if ls /usr/local/share/ca-certificates/*.crt >/dev/null 2>&1; then
  cp /usr/local/share/ca-certificates/*.crt "$root/usr/local/share/ca-certificates/"
  chroot "$root" update-ca-certificates >/dev/null 2>&1
fi
trust_env=()
[ -n "${NODE_EXTRA_CA_CERTS:-}" ] && trust_env+=(NODE_EXTRA_CA_CERTS=/etc/ssl/certs/ca-certificates.crt)
printf '127.0.0.1 localhost\n::1 localhost ip6-localhost\n' >"$root/etc/hosts"
node_bin="$(readlink -f "$(command -v node)")"
npm_dir="$(dirname "$(dirname "$(readlink -f "$(command -v npm)")")")"
install -D -m 755 "$node_bin" "$root/usr/local/bin/node"
mkdir -p "$root/usr/local/lib/node_modules"
cp -a "$npm_dir" "$root/usr/local/lib/node_modules/npm"
ln -s ../lib/node_modules/npm/bin/npm-cli.js "$root/usr/local/bin/npm"
ln -s ../lib/node_modules/npm/bin/npx-cli.js "$root/usr/local/bin/npx"
branch="$(git -C "$checkout" rev-parse --abbrev-ref HEAD)"
git clone -q --no-local --branch "$branch" "$checkout" "$root/root/falciform"
echo "   cloned $branch at $(git -C "$root/root/falciform" log -1 --format='%h %s' | cut -c1-80)"
took

# Inside the root: the README's commands, as CI runs them (root, CI=true, no stdin).
cat >"$root/root/fresh-run.sh" <<'INSIDE'
set -uo pipefail
cd /root/falciform
t0=$(date +%s)
echo "== npm install"
npm install --no-audit --no-fund >/root/install.log 2>&1; rc=$?
tail -5 /root/install.log; grep -c 'EBADENGINE' /root/install.log | sed 's/^/   EBADENGINE lines: /'
echo "   exit $rc ($(( $(date +%s) - t0 )) s)"
[ $rc = 0 ] || exit 1

echo "== npm start (until the app answers at the address it prints)"
t1=$(date +%s)
setsid npm start >/root/start.log 2>&1 &
pid=$!  # its own process group, so Ctrl-C reaches npm, the build and the server alike
url=""
for _ in $(seq 1 180); do
  url="$(grep -oE 'http://127\.0\.0\.1:[0-9]+/' /root/start.log | head -1 || true)"
  [ -n "$url" ] && break
  sleep 1
done
if [ -n "$url" ] && node -e "fetch('$url').then(async r=>{const t=await r.text();process.exit(r.ok&&t.includes('<div id=\"root\"')?0:1)},()=>process.exit(1))"; then
  echo "   served and answering at $url ($(( $(date +%s) - t1 )) s after npm start)"; start_ok=1
else
  echo "   npm start did not serve the app"; start_ok=0
fi
kill -INT -- -$pid 2>/dev/null; wait $pid 2>/dev/null
sed 's/^/   | /' /root/start.log | grep -v '^   | *$' | tail -8

echo "== npm install && npm test"
t2=$(date +%s)
npm install --no-audit --no-fund >>/root/install.log 2>&1 && npm test >/root/test.log 2>&1; rc=$?
grep -E '^== |^Installing|^  [a-z0-9-]+: |system tools|The tests need' /root/test.log | head -30
echo "   ..."
tail -3 /root/test.log
echo "   exit $rc ($(( $(date +%s) - t2 )) s)"
[ $rc = 0 ] && [ $start_ok = 1 ]
INSIDE

begin "run the README's commands in the fresh root (logs: $root/root/*.log)"
set +e
unshare --mount --pid --fork --mount-proc="$root/proc" bash -c '
  set -e
  mount --rbind /dev "$1/dev"
  mount --rbind /sys "$1/sys"
  mount -t tmpfs -o mode=1777 tmpfs "$1/dev/shm"
  root=$1; shift
  exec chroot "$root" /usr/bin/env -i HOME=/root CI=true LANG=C.UTF-8 TERM=dumb \
    PATH=/usr/local/bin:/usr/local/sbin:/usr/bin:/usr/sbin:/bin:/sbin "$@" bash /root/fresh-run.sh </dev/null' _ "$root" "${trust_env[@]}"
rc=$?
set -e
took
if [ $rc = 0 ]; then echo "FRESH MACHINE: the README's commands passed"; else echo "FRESH MACHINE: failed (exit $rc)"; fi
exit $rc
