#!/usr/bin/env python3
"""The gate's scale-out run on a real Slurm cluster of one node.

Starts munged, slurmctld and slurmd from the Debian packages with every file
(key, socket, config, state, spool, logs) in a temporary folder, submits the
scripts that docs/gate.md shows (tests/cluster/*.sh, checked against the
page by docs_test.py) over a folder of 12 small clips as a 4-task job array
and a merge that waits for it (afterok), and checks:

  - the merged queue equals a single-machine run of the same clips (same
    clips, verdicts and report bytes: reports hold no timings), no clip was analysed
    twice, the store rows are complete;
  - a task cancelled with scancel cancels the dependent merge, and a merge
    run anyway refuses, naming the missing shard; rerunning that index alone
    completes it and the merge succeeds;
  - a finished task requeued by Slurm takes its clips from its store and
    adds no rows; one requeued while running takes the clips it had stored
    from its store and ends with each clip once.

Exit status 77 (ctest: skipped) with the reason when the daemons cannot run
here (not root, packages missing, a daemon that does not come up). Every
daemon started is stopped by its process id, also when a check fails.

usage: slurm_cluster_test.py --clipwarden PATH --source DIR
"""
import argparse
import json
import os
import shutil
import socket
import sqlite3
import subprocess
import sys
import tempfile
import time

SKIP = 77
STARTED = time.monotonic()
SHARDS = 4
CLIPS = 12
TERMINAL_STATES = {"COMPLETED", "FAILED", "CANCELLED", "TIMEOUT", "NODE_FAIL",
                   "OUT_OF_MEMORY", "BOOT_FAIL", "DEADLINE", "PREEMPTED"}


class Skip(Exception):
    pass


class Failed(AssertionError):
    pass


def say(text):
    print(f"[{time.monotonic() - STARTED:5.1f} s] {text}", flush=True)


def check(condition, message):
    if not condition:
        raise Failed(message)


def free_port():
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


class Cluster:
    """munged + slurmctld + slurmd in the foreground, children of this
    process, configured entirely under `root`."""

    def __init__(self, root):
        self.root = root
        self.procs = []  # (name, Popen), in start order
        self.env = {k: v for k, v in os.environ.items()
                    if not k.startswith(("SLURM_", "SBATCH_", "SQUEUE_", "SALLOC_"))}
        self.env["SLURM_CONF"] = os.path.join(root, "slurm.conf")

    def path(self, *parts):
        return os.path.join(self.root, *parts)

    def start(self):
        for d in ("munge", "state", "spool", "log"):
            os.makedirs(self.path(d), mode=0o700)
        sock = self.path("munge", "socket")
        run(["mungekey", "--create", "--keyfile=" + self.path("munge", "key")])
        self.spawn("munged", ["munged", "--foreground", "--force", "--socket=" + sock,
                              "--key-file=" + self.path("munge", "key"),
                              "--log-file=" + self.path("log", "munged.log"),
                              "--pid-file=" + self.path("munge", "pid"),
                              "--seed-file=" + self.path("munge", "seed")])
        self.wait_for(lambda: os.path.exists(sock), "munged's socket", 15)
        host = socket.gethostname().split(".")[0]
        # The node claims 32 CPUs and 64 GB (config_overrides: slurmd does
        # not check them against the machine), so the documented script's
        # --cpus-per-task=8 --mem=8G runs as written, 4 tasks at once.
        # proctrack/pgid and task/none need no cgroups; memory is not a
        # consumable resource with CR_CPU. pgid, not linuxproc: a gate whose
        # batch script died of the SIGTERM of a requeue must still count as
        # the job (as in a cgroup), or Slurm starts the rerun while the
        # old gate finishes its clips in flight, and both store them.
        conf = f"""ClusterName=clipwarden-test
SlurmctldHost={host}(127.0.0.1)
SlurmctldPort={free_port()}
SlurmdPort={free_port()}
AuthType=auth/munge
AuthInfo=socket={sock}
CredType=cred/munge
SlurmUser=root
SlurmdUser=root
StateSaveLocation={self.path('state')}
SlurmdSpoolDir={self.path('spool')}
SlurmctldPidFile={self.path('slurmctld.pid')}
SlurmdPidFile={self.path('slurmd.pid')}
SlurmctldLogFile={self.path('log', 'slurmctld.log')}
SlurmdLogFile={self.path('log', 'slurmd.log')}
ProctrackType=proctrack/pgid
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_CPU
SlurmdParameters=config_overrides
SchedulerType=sched/backfill
MpiDefault=none
JobRequeue=1
ReturnToService=2
MinJobAge=3600
AccountingStorageType=accounting_storage/none
JobAcctGatherType=jobacct_gather/none
JobCompType=jobcomp/none
NodeName={host} NodeAddr=127.0.0.1 CPUs=32 RealMemory=65536 State=UNKNOWN
PartitionName=gate Nodes={host} Default=YES MaxTime=INFINITE State=UP
"""
        with open(self.env["SLURM_CONF"], "w") as f:
            f.write(conf)
        self.spawn("slurmctld", ["slurmctld", "-D", "-i"])
        self.spawn("slurmd", ["slurmd", "-D"])
        self.wait_for(lambda: self.node_state() == "idle", "the node to come up idle", 45)

    def spawn(self, name, argv):
        log = open(self.path("log", name + ".out"), "w")
        self.procs.append((name, subprocess.Popen(argv, env=self.env, stdout=log,
                                                  stderr=subprocess.STDOUT, cwd=self.root)))

    def wait_for(self, ready, what, seconds):
        deadline = time.monotonic() + seconds
        while time.monotonic() < deadline:
            for name, p in self.procs:
                if p.poll() is not None:
                    raise Skip(f"{name} exited with status {p.returncode} at start-up:\n" +
                               self.log_tail())
            if ready():
                return
            time.sleep(0.3)
        raise Skip(f"waited {seconds} s for {what}:\n" + self.log_tail())

    def node_state(self):
        r = subprocess.run(["sinfo", "-h", "-o", "%t"], env=self.env, capture_output=True,
                           text=True)
        return r.stdout.strip() if r.returncode == 0 else ""

    def log_tail(self, lines=15):
        out = []
        for name in sorted(os.listdir(self.path("log"))):
            with open(self.path("log", name), errors="replace") as f:
                tail = f.read().splitlines()[-lines:]
            out.append(f"--- {name}\n" + "\n".join(tail))
        return "\n".join(out)

    def stop(self):
        # Jobs first (their slurmstepd outlives slurmd), then the daemons in
        # reverse order, each by its own pid: SIGTERM, then SIGKILL.
        if any(name == "slurmctld" and p.poll() is None for name, p in self.procs):
            subprocess.run(["scancel", "--user=" + str(os.getuid())], env=self.env,
                           capture_output=True)
            deadline = time.monotonic() + 20
            while time.monotonic() < deadline and self.squeue():
                time.sleep(0.3)
        for name, p in reversed(self.procs):
            if p.poll() is None:
                p.terminate()
                try:
                    p.wait(timeout=15)
                except subprocess.TimeoutExpired:
                    p.kill()
                    p.wait()
        self.procs.clear()

    def squeue(self):
        r = subprocess.run(["squeue", "-h", "-o", "%i"], env=self.env, capture_output=True,
                           text=True)
        return r.stdout.split() if r.returncode == 0 else []

    # --- jobs

    def sbatch(self, args, cwd, extra_env=None):
        env = dict(self.env, **(extra_env or {}))
        r = run(["sbatch", "--parsable"] + args, env=env, cwd=cwd)
        return r.stdout.strip().split(";")[0]

    def job_states(self, job):
        """{array task id or job id: (state, exit code text, restarts)} of a job."""
        r = run(["scontrol", "-o", "show", "job", job], env=self.env)
        states = {}
        for line in r.stdout.splitlines():
            fields = dict(f.split("=", 1) for f in line.split() if "=" in f)
            key = fields.get("ArrayTaskId", fields.get("JobId"))
            states[key] = (fields.get("JobState"), fields.get("ExitCode"),
                           int(fields.get("Restarts", "0")))
        return states

    def wait_done(self, job, seconds=120):
        deadline = time.monotonic() + seconds
        while True:
            states = self.job_states(job)
            if states and all(s[0] in TERMINAL_STATES for s in states.values()):
                return states
            check(time.monotonic() < deadline,
                  f"job {job} not done after {seconds} s: {states}\n" + self.log_tail())
            time.sleep(0.5)


def run(argv, **kw):
    r = subprocess.run(argv, capture_output=True, text=True, **kw)
    if r.returncode != 0:
        raise Failed(f"{' '.join(argv)} exited {r.returncode}:\n{r.stdout}{r.stderr}")
    return r


def make_clips(folder):
    """12 one-second 160x120 clips of moving test patterns, each a different
    hue, and a manifest naming them clip_00 ... clip_11. The ids, not the
    temporary paths, decide the shares: 3, 3, 2 and 4 clips in shards 0-3."""
    os.makedirs(folder)
    with open(os.path.join(folder, "manifest.jsonl"), "w") as manifest:
        for i in range(CLIPS):
            name = f"clip_{i:02d}"
            run(["ffmpeg", "-nostdin", "-loglevel", "error", "-f", "lavfi", "-i",
                 "testsrc2=size=160x120:rate=12:duration=1", "-vf", f"hue=h={i * 29 % 360}",
                 "-pix_fmt", "yuv420p", os.path.join(folder, name + ".mp4")])
            manifest.write(json.dumps({"path": name + ".mp4", "id": name}) + "\n")
    return os.path.join(folder, "manifest.jsonl")


def queue(folder):
    with open(os.path.join(folder, "queue.jsonl")) as f:
        return [json.loads(line) for line in f if line.strip()]


def store_rows(db):
    con = sqlite3.connect(db)
    con.row_factory = sqlite3.Row
    try:
        return [dict(r) for r in con.execute("SELECT * FROM analyses")]
    finally:
        con.close()


def same_bytes(a, b):
    with open(a, "rb") as fa, open(b, "rb") as fb:
        return fa.read() == fb.read()


def check_merged_equals_single(merged, single, what):
    a, b = queue(single), queue(merged)
    check(len(b) == CLIPS and len(a) == CLIPS, f"{what}: {len(b)} merged, {len(a)} single clips")
    for one, joined in zip(a, b):
        one, joined = dict(one), dict(joined)
        one.pop("from_store")
        joined.pop("from_store")
        check(one == joined, f"{what}: queue lines differ:\n{one}\n{joined}")
        # Reports hold no wall-clock time (docs/report.md), so the JSON
        # report and its page must be the same bytes as the single run's.
        for name in (joined["report"], joined["report"][:-5] + ".html"):
            check(same_bytes(os.path.join(single, name), os.path.join(merged, name)),
                  f"{what}: {name} differs from the single-machine run's")
    rows = store_rows(os.path.join(merged, "clipwarden.db"))
    check(len(rows) == CLIPS and len({r["content_sha256"] for r in rows}) == CLIPS,
          f"{what}: merged store has {len(rows)} rows for {CLIPS} clips")
    by_sha = {line["sha256"]: line for line in b}
    for row in rows:
        line = by_sha.get(row["content_sha256"])
        check(line is not None, f"{what}: store row of a clip not in the queue: {row['clip_path']}")
        for key in ("settings_hash", "tool_version", "clip_id", "clip_path", "verdict",
                    "reasons_json", "summary_json", "report_path", "created_at"):
            check(row[key] not in (None, ""), f"{what}: store row of {line['id']} has no {key}")
        check(row["clip_id"] == line["id"] and row["verdict"] == line["verdict"],
              f"{what}: store row {row['clip_id']} {row['verdict']} vs queue {line['verdict']}")
        check(os.path.realpath(row["report_path"]) ==
              os.path.realpath(os.path.join(merged, line["report"])),
              f"{what}: store row of {line['id']} points at {row['report_path']}")


def stored_so_far(db):
    """Content hashes in a store a running gate writes to (read-only: WAL
    lets a reader in; a store not created yet holds nothing)."""
    if not os.path.exists(db):
        return set()
    try:
        con = sqlite3.connect(f"file:{db}?mode=ro", uri=True)
        try:
            return {r[0] for r in con.execute("SELECT content_sha256 FROM analyses")}
        finally:
            con.close()
    except sqlite3.Error:  # the schema is being created
        return set()


def shard_rows(run_dir):
    rows = []
    for i in range(SHARDS):
        rows += store_rows(os.path.join(run_dir, f"shard-{i}", "clipwarden.db"))
    return rows


def job_output(folder, job, task=None):
    name = f"slurm-{job}_{task}.out" if task is not None else f"slurm-{job}.out"
    with open(os.path.join(folder, name), errors="replace") as f:
        return f.read()


class Batch:
    """The scripts of docs/gate.md, the clips and the single-machine run
    every merged queue is held against."""

    def __init__(self, cluster, work, scripts):
        self.cluster, self.work, self.scripts = cluster, work, scripts
        self.single = os.path.join(work, "single")
        self.manifest = make_clips(os.path.join(work, "clips"))
        r = subprocess.run(["clipwarden", "gate", self.manifest, "--out", self.single, "--jobs", "2",
                            "--quiet"], env=cluster.env, capture_output=True, text=True)
        check(r.returncode in (0, 1), f"single-machine gate exited {r.returncode}: {r.stderr}")

    def env(self, run_dir):
        return {"INPUT": self.manifest, "SHARDS": str(SHARDS), "RUN": run_dir}

    def submit(self, run_dir):
        """submit.sh: (array job id, merge job id)."""
        out = run([os.path.join(self.scripts, "submit.sh")],
                  env=dict(self.cluster.env, **self.env(run_dir)), cwd=self.work).stdout.split()
        check(len(out) == 2, f"submit.sh printed {out}, not two job ids")
        return out

    def sbatch(self, script, run_dir, options=()):
        return self.cluster.sbatch(list(options) + [os.path.join(self.scripts, script)],
                                   self.work, self.env(run_dir))

    def merge(self, run_dir):
        """merge.sh submitted alone: (job state, exit code, its output)."""
        job = self.sbatch("merge.sh", run_dir)
        state = self.cluster.wait_done(job)[job]
        return state[0], state[1], job_output(self.work, job)


def documented_run(b):
    """submit.sh as documented: the array, then the merge after it."""
    run_a = os.path.join(b.work, "run-a")
    array, merge_job = b.submit(run_a)
    tasks = b.cluster.wait_done(array)
    check(sorted(tasks) == [str(i) for i in range(SHARDS)] and
          all(s[0] == "COMPLETED" for s in tasks.values()), f"array tasks: {tasks}")
    merged = b.cluster.wait_done(merge_job)
    check(all(s[0] == "COMPLETED" for s in merged.values()),
          f"merge job: {merged}\n{job_output(b.work, merge_job)}")
    check_merged_equals_single(os.path.join(run_a, "queue"), b.single, "array + afterok merge")
    rows = shard_rows(run_a)
    check(len(rows) == CLIPS and len({r["content_sha256"] for r in rows}) == CLIPS,
          f"{len(rows)} analyses in the shards' stores for {CLIPS} clips")
    for i in range(SHARDS):
        for line in queue(os.path.join(run_a, f"shard-{i}")):
            check(not line["from_store"], f"shard {i}: {line['id']} taken from a store")
    say(f"submit.sh: array {array} and merge {merge_job}: {CLIPS} clips in {SHARDS} shards, "
          "merged queue, reports and store equal the single-machine run")


def cancelled_task(b):
    """scancel of one index: Slurm cancels the dependent merge, a merge run
    anyway refuses naming the shard, rerunning that index completes it.
    The partition is down while the batch is submitted, so that the cancel
    lands before the task starts whatever the machine's load."""
    run_b = os.path.join(b.work, "run-b")
    run(["scontrol", "update", "PartitionName=gate", "State=DOWN"], env=b.cluster.env)
    array, merge_job = b.submit(run_b)
    run(["scancel", f"{array}_2"], env=b.cluster.env)
    run(["scontrol", "update", "PartitionName=gate", "State=UP"], env=b.cluster.env)
    tasks = b.cluster.wait_done(array)
    check(tasks.get("2", ("CANCELLED",))[0] == "CANCELLED" and
          all(tasks[str(i)][0] == "COMPLETED" for i in (0, 1, 3)), f"array tasks: {tasks}")
    dependent = b.cluster.wait_done(merge_job)[merge_job]
    check(dependent[0] == "CANCELLED", f"merge after a cancelled task: {dependent}")
    state, code, refusal = b.merge(run_b)
    check(state == "FAILED" and code == "2:0", f"merge with shard 2 missing: {state} {refusal}")
    check("shard 2 of 4 is missing" in refusal,
          f"the merge's message does not name shard 2: {refusal}")
    check(not os.path.exists(os.path.join(run_b, "queue", "queue.jsonl")),
          "the refused merge wrote a queue")
    rerun = b.sbatch("gate-array.sh", run_b, ["--array=2"])
    check(b.cluster.wait_done(rerun)["2"][0] == "COMPLETED", "rerun of index 2 failed")
    state, code, text = b.merge(run_b)
    check(state == "COMPLETED", f"merge after the rerun: {state} {code} {text}")
    check_merged_equals_single(os.path.join(run_b, "queue"), b.single, "after the rerun")
    say(f"scancel {array}_2: merge {merge_job} cancelled by Slurm, merge.sh refused "
          f"({refusal.strip()}); sbatch --array=2 completed it")
    return run_b, array


def requeue(cluster, task):
    """scontrol requeue, then start it at once: Slurm holds a requeued job
    back for cred_expire (120 s). Waits for the rerun to end; its state."""
    job, index = task.split("_")
    run(["scontrol", "requeue", task], env=cluster.env)
    deadline = time.monotonic() + 120
    started = False
    while True:
        state, _, restarts = cluster.job_states(task)[index]
        if restarts >= 1 and state == "PENDING" and not started:
            run(["scontrol", "update", f"JobId={task}", "StartTime=now"], env=cluster.env)
            started = True
        if started and state in TERMINAL_STATES:
            return state
        check(time.monotonic() < deadline, f"requeued {task}: {state}, {restarts} restarts")
        time.sleep(0.3)


def requeued_tasks(b, run_b, array):
    """A finished task requeued runs again from its start: its clips come
    from its store, which gains no row. A running one requeued (SIGTERM,
    then a rerun) resumes from its store and ends with every clip once."""
    shard1 = os.path.join(run_b, "shard-1")
    before = store_rows(os.path.join(shard1, "clipwarden.db"))
    check(requeue(b.cluster, f"{array}_1") == "COMPLETED", "requeued task failed")
    lines = queue(shard1)
    check(lines and all(line["from_store"] for line in lines),
          f"requeued shard 1 recomputed clips: {lines}")
    after = store_rows(os.path.join(shard1, "clipwarden.db"))
    check(after == before, f"requeued shard 1's store changed: {len(before)} -> {len(after)} rows")
    state, code, text = b.merge(run_b)
    check(state == "COMPLETED", f"merge after the requeue: {state} {code} {text}")
    check_merged_equals_single(os.path.join(run_b, "queue"), b.single, "after the requeue")
    say(f"scontrol requeue {array}_1 (finished): {len(lines)} clips from its store, "
          f"{len(after)} rows as before")

    # Requeued once its store holds a clip, while the others are still in
    # flight or just done (how far it got depends on the machine's load):
    # the clips stored before come from the store, none is stored twice.
    run_c = os.path.join(b.work, "run-c")
    shard3 = os.path.join(run_c, "shard-3")
    job = b.sbatch("gate-array.sh", run_c, ["--array=3"])
    deadline = time.monotonic() + 90
    while not (stored := stored_so_far(os.path.join(shard3, "clipwarden.db"))):
        check(time.monotonic() < deadline, f"task {job}_3 stored no clip")
        time.sleep(0.05)
    check(requeue(b.cluster, f"{job}_3") == "COMPLETED", "requeued running task failed")
    lines = queue(shard3)
    rows = store_rows(os.path.join(shard3, "clipwarden.db"))
    with open(os.path.join(shard3, "shard.json")) as f:
        record = json.load(f)
    check(record["finished"] and len(lines) == record["clips"] == 4 and
          len({line["id"] for line in lines}) == 4, f"shard 3 after the requeue: {lines}")
    check(len(rows) == 4 and len({r["content_sha256"] for r in rows}) == 4,
          f"shard 3's store after the requeue: {len(rows)} rows for 4 clips")
    for line in lines:
        if line["sha256"] in stored:
            check(line["from_store"], f"{line['id']} was stored before the requeue, yet redone")
    say(f"scontrol requeue {job}_3 with {len(stored)} of 4 clips stored: 4 clips once each, "
          f"{sum(line['from_store'] for line in lines)} from the store")


def scenario(cluster, work, scripts):
    b = Batch(cluster, work, scripts)
    say(f"{CLIPS} clips made and gated on this machine")
    documented_run(b)
    run_b, array = cancelled_task(b)
    requeued_tasks(b, run_b, array)


def main():
    p = argparse.ArgumentParser()
    p.add_argument("--clipwarden", required=True)
    p.add_argument("--source", required=True)
    a = p.parse_args()
    start = time.monotonic()
    try:
        if os.geteuid() != 0:
            raise Skip("slurmd and munged run as root here; this user is not root")
        missing = [t for t in ("munged", "mungekey", "slurmctld", "slurmd", "sbatch", "scontrol",
                               "scancel", "sinfo", "squeue", "ffmpeg") if not shutil.which(t)]
        if missing:
            raise Skip("not installed: " + " ".join(missing) +
                       " (bash .ci/setup --tests installs slurm-wlm and munge)")
    except Skip as e:
        print(f"SKIPPED: {e}")
        return SKIP
    work = tempfile.mkdtemp(prefix="clipwarden-slurm-")
    os.chmod(work, 0o755)
    bin_dir = os.path.join(work, "bin")
    os.makedirs(bin_dir)
    os.symlink(os.path.abspath(a.clipwarden), os.path.join(bin_dir, "clipwarden"))
    cluster = Cluster(os.path.join(work, "cluster"))
    cluster.env["PATH"] = bin_dir + os.pathsep + cluster.env.get("PATH", "")
    status = 0
    try:
        os.makedirs(cluster.root)
        cluster.start()
        say("cluster up")
        scenario(cluster, work, os.path.join(os.path.abspath(a.source), "tests", "cluster"))
    except Skip as e:
        print(f"SKIPPED: the cluster could not start: {e}")
        status = SKIP
    except Failed as e:
        print(f"FAILED: {e}")
        status = 1
    finally:
        cluster.stop()
        if status == 1 and os.environ.get("CLIPWARDEN_KEEP_CLUSTER_TEST"):
            print(f"kept {work}")
        else:
            shutil.rmtree(work, ignore_errors=True)
    print(f"took {time.monotonic() - start:.1f} s")
    return status


if __name__ == "__main__":
    sys.exit(main())
