#!/usr/bin/env bash
# Integration test on a real scheduler: a sharded `singleshot run` submitted to a single-node
# SLURM on this machine as a job array (one task per shard), merged, and compared byte for byte
# with the same run in one process.
#
#   bash test/cluster/run-slurm.sh
#
# Installs Debian's slurm-wlm and munge when they are missing, starts munged (if not running),
# slurmctld and slurmd with a configuration in a temporary folder (SLURM_CONF), and stops the
# daemons it started, by the process ids in their pid files, on exit.
# Prints one closing line: "SLURM integration: PASSED", "... SKIPPED (reason)" (exit 0: cannot
# install or start a scheduler here, e.g. no network or not root) or "... FAILED (reason)" (exit 1).
set -u
REPO="$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)"
SCENARIO="$REPO/test/fixtures/scenarios/shard-sweep.yaml"
SHARDS="${SLURM_TEST_SHARDS:-3}"
ENGINE="${SLURM_TEST_ENGINE:-traces}"
WORK="$(mktemp -d /tmp/singleshot-slurm.XXXXXX)"
STARTED_MUNGE=""

say() { echo "[slurm test] $*"; }
skip() { echo "SLURM integration: SKIPPED ($*)"; exit 0; }
fail() {
  echo "SLURM integration: FAILED ($*)"
  for f in "$WORK"/slurmctld.log "$WORK"/slurmd.log "$WORK"/job-*.out; do
    [ -f "$f" ] && { echo "--- $f (last lines)"; tail -n 15 "$f"; }
  done
  exit 1
}

stop_pid_file() {
  local f="$1"
  [ -f "$f" ] || return 0
  local pid
  pid="$(cat "$f" 2>/dev/null)"
  if [ -n "$pid" ] && kill -0 "$pid" 2>/dev/null; then
    kill "$pid" 2>/dev/null
    for _ in $(seq 1 50); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
  fi
}

cleanup() {
  stop_pid_file "$WORK/slurmd.pid"
  stop_pid_file "$WORK/slurmctld.pid"
  [ -n "$STARTED_MUNGE" ] && stop_pid_file "$STARTED_MUNGE"
  rm -rf "$WORK"
}
trap cleanup EXIT

[ "$(id -u)" = 0 ] || skip "needs root to install and start slurm-wlm and munge"
command -v node >/dev/null || skip "node is not on PATH"

# 1. packages
if ! command -v slurmctld >/dev/null || ! command -v slurmd >/dev/null || ! command -v sbatch >/dev/null || ! command -v munged >/dev/null; then
  say "installing slurm-wlm and munge (apt-get)"
  export DEBIAN_FRONTEND=noninteractive
  if ! { apt-get update -qq >"$WORK/apt.log" 2>&1 && apt-get install -y -qq slurm-wlm munge >>"$WORK/apt.log" 2>&1; }; then
    tail -n 3 "$WORK/apt.log"
    skip "cannot install slurm-wlm and munge (no package network?)"
  fi
fi

# 2. munge (authentication between the SLURM daemons and clients)
if ! pgrep -x munged >/dev/null; then
  mkdir -p /etc/munge /run/munge /var/log/munge /var/lib/munge
  if [ ! -s /etc/munge/munge.key ]; then
    dd if=/dev/urandom bs=1 count=1024 of=/etc/munge/munge.key 2>/dev/null || skip "cannot write a munge key"
  fi
  chown munge:munge /etc/munge/munge.key /run/munge /var/log/munge /var/lib/munge 2>/dev/null
  chmod 400 /etc/munge/munge.key
  chmod 700 /etc/munge
  if command -v runuser >/dev/null && id munge >/dev/null 2>&1; then
    runuser -u munge -- munged --force >"$WORK/munged.out" 2>&1 || munged --force >"$WORK/munged.out" 2>&1
  else
    munged --force >"$WORK/munged.out" 2>&1
  fi
  sleep 1
  pgrep -x munged >/dev/null || { cat "$WORK/munged.out"; skip "munged does not start"; }
  STARTED_MUNGE=/run/munge/munged.pid
fi
munge -n 2>/dev/null | unmunge >/dev/null 2>&1 || skip "munge cannot encode and decode a credential"

# 3. a single-node SLURM configured in $WORK
HOST="$(hostname -s)"
CPUS="$(nproc)"
mkdir -p "$WORK/state" "$WORK/spool"
cat >"$WORK/slurm.conf" <<EOF
ClusterName=singleshot-test
SlurmctldHost=$HOST
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
StateSaveLocation=$WORK/state
SlurmdSpoolDir=$WORK/spool
SlurmctldPidFile=$WORK/slurmctld.pid
SlurmdPidFile=$WORK/slurmd.pid
SlurmctldLogFile=$WORK/slurmctld.log
SlurmdLogFile=$WORK/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_CPU
ReturnToService=2
MpiDefault=none
JobCompType=jobcomp/none
AccountingStorageType=accounting_storage/none
NodeName=$HOST CPUs=$CPUS State=UNKNOWN
PartitionName=debug Nodes=$HOST Default=YES MaxTime=INFINITE State=UP
EOF
export SLURM_CONF="$WORK/slurm.conf"
slurmctld -f "$SLURM_CONF" >"$WORK/slurmctld.out" 2>&1 || { cat "$WORK/slurmctld.out"; skip "slurmctld does not start"; }
slurmd -f "$SLURM_CONF" >"$WORK/slurmd.out" 2>&1 || { cat "$WORK/slurmd.out"; skip "slurmd does not start"; }
ready=""
for _ in $(seq 1 60); do
  state="$(sinfo -h -o '%t' 2>/dev/null | head -n 1)"
  case "$state" in idle*|mix*|alloc*) ready=1; break ;; esac
  sleep 1
done
[ -n "$ready" ] || skip "the SLURM node did not become idle within 60 s (sinfo: ${state:-no answer})"
say "SLURM up: $(sinfo -h -o '%P %D %t %c' | head -n 1) ($(sinfo -V))"

# 4. the reference: the same run in one process
cd "$REPO" || fail "cannot enter $REPO"
COMMON=(--engine "$ENGINE" --workers 1 --quiet --no-report)
node bin/singleshot.js run "$SCENARIO" --out "$WORK/whole" "${COMMON[@]}" >"$WORK/whole.out" 2>&1 || { cat "$WORK/whole.out"; fail "the single-process run failed"; }

# 5. the job array: task i runs shard i+1 of SLURM_ARRAY_TASK_COUNT
cat >"$WORK/job.sh" <<EOF
#!/usr/bin/env bash
set -eu
K=\$((SLURM_ARRAY_TASK_ID + 1))
exec node "$REPO/bin/singleshot.js" run "$SCENARIO" --out "$WORK/shard-\$K" --shard "\$K/\$SLURM_ARRAY_TASK_COUNT" ${COMMON[*]}
EOF
chmod +x "$WORK/job.sh"
say "submitting a job array of $SHARDS shards"
if ! timeout 900 sbatch --wait --array="0-$((SHARDS - 1))" --chdir="$REPO" --output="$WORK/job-%a.out" --job-name=singleshot-shards "$WORK/job.sh" >"$WORK/sbatch.out" 2>&1; then
  cat "$WORK/sbatch.out"
  fail "the job array did not finish successfully"
fi
say "$(head -n 1 "$WORK/sbatch.out"); array finished"
for k in $(seq 1 "$SHARDS"); do
  [ -f "$WORK/shard-$k/run.json" ] || fail "shard $k/$SHARDS wrote no run.json"
  grep -q "\"shard\": \"$k/$SHARDS\"" "$WORK/shard-$k/run.json" || fail "shard-$k/run.json does not say shard $k/$SHARDS"
done

# 6. merge and compare byte for byte
node bin/singleshot.js merge "$WORK"/shard-* --out "$WORK/merged" --no-report >"$WORK/merge.out" 2>&1 || { cat "$WORK/merge.out"; fail "merge failed"; }
compared=0
for f in "$WORK"/whole/*; do
  name="$(basename "$f")"
  [ "$name" = run.json ] && continue
  cmp "$f" "$WORK/merged/$name" || fail "$name differs between the merged shards and the single-process run"
  say "identical: $name ($(stat -c %s "$f") bytes)"
  compared=$((compared + 1))
done
[ "$compared" -ge 4 ] || fail "only $compared tables compared"
echo "SLURM integration: PASSED ($SHARDS-task job array, engine $ENGINE, $compared tables byte-identical to the single-process run)"
