import { resolve } from "node:path";
import { parseArgs } from "node:util";
import { portableReadOptions } from "../../extract/extractionOptions.js";
import { resolvePipelineOptions } from "../../pipeline/options.js";
import { DEFAULT_QUEUE_NAME, DEFAULT_QUEUE_URL, parseQueueUrl } from "../../queue/queueAddress.js";
import { runWorker } from "../../queue/runWorker.js";
import { submitJobs, waitForJobs } from "../../queue/submitJobs.js";
import type { Command } from "../command.js";
import { RECORDING_HELP, RECORDING_OPTIONS, recordingOptions } from "../recordingOptions.js";
import { UsageError, numberOption } from "../usageError.js";
import { EXTRACT_CLI_OPTIONS, EXTRACT_HELP } from "./extract.js";
import { pipelineOptions } from "./plan.js";

const QUEUE_OPTIONS = { queue: { type: "string" }, name: { type: "string" } } as const;
const QUEUE_HELP = `  --queue URL          the Redis server holding the queue            (default: ${DEFAULT_QUEUE_URL})
  --name Q             queue name                                     (default: ${DEFAULT_QUEUE_NAME})`;

const SUBMIT_HELP = `roadsieve submit TRACKS... --shards DIR [options]

Put one extraction job per recording on a BullMQ queue in Redis, for \`roadsieve worker\`
processes on any number of machines, and write DIR/expected.json (the recordings that make the
set complete, in plan order). Paths must be the same on every machine (shared storage). A job
that fails is retried, up to 3 attempts; with --wait, submit waits for every job, writes a report
of each job that failed for good into DIR/failed/ and names them. Then: roadsieve plan DIR.

Options:
  --shards DIR         shard folder on shared storage (required)
${QUEUE_HELP}
${RECORDING_HELP}
${EXTRACT_HELP}
  --wait               wait for every job; exit 2 naming each recording that failed for good
  --quiet              no progress lines
`;

export const submitCommand: Command = {
  name: "submit",
  summary: "put one extraction job per recording on a Redis queue (BullMQ), for workers",
  help: SUBMIT_HELP,
  async run(argv) {
    const { values, positionals } = parseArgs({
      args: argv,
      options: { ...QUEUE_OPTIONS, ...RECORDING_OPTIONS, ...EXTRACT_CLI_OPTIONS, shards: { type: "string" }, wait: { type: "boolean", default: false }, quiet: { type: "boolean", default: false } },
      strict: true,
      allowPositionals: true,
    });
    if (positionals.length === 0) throw new UsageError("give at least one tracks file; roadsieve submit --help");
    if (!values.shards) throw new UsageError("--shards DIR is required");
    const a = parseQueueUrl(values.queue ?? DEFAULT_QUEUE_URL, values.name ?? DEFAULT_QUEUE_NAME);
    const read = portableReadOptions(await recordingOptions(values));
    const o = resolvePipelineOptions(pipelineOptions(values));
    // Workers may run elsewhere: every path they get is absolute.
    const sources = positionals.map((p) => resolve(p));
    if (typeof read.road === "string") read.road = resolve(read.road);
    const dir = resolve(values.shards);
    const s = await submitJobs(a, sources, read, o, dir);
    process.stdout.write(`submitted ${s.added} job(s) (${s.total - s.added} already on the queue) to ${a.name} at redis://${a.host}:${a.port}; expected recordings in ${dir}/expected.json\n`);
    if (!values.wait) return 0;
    let last = "";
    const outcome = await waitForJobs(a, sources, dir, (done, failed, total) => {
      const line = `${done} done, ${failed} failed, ${total - done - failed} to go`;
      if (line !== last && !values.quiet) process.stderr.write(`${line}\n`);
      last = line;
    });
    for (const f of outcome.failed) process.stdout.write(`failed for good after ${f.attempts} attempts: ${f.source}: ${f.reason}\n`);
    if (outcome.failed.length > 0) {
      process.stderr.write(`roadsieve submit: ${outcome.failed.length} of ${sources.length} recordings failed (listed above and in ${dir}/failed/); plan ${dir} refuses the incomplete set unless --allow-incomplete\n`);
      return 2;
    }
    process.stdout.write(`all ${sources.length} shards are in ${dir}\n`);
    return 0;
  },
};

const WORKER_HELP = `roadsieve worker [options]

Take extraction jobs from the queue (see roadsieve submit) and write each recording's shard into
the job's shard folder, until stopped (SIGTERM or Ctrl-C finish the current job first; a second
signal stops at once). Start one
per core on as many machines as you like; a worker that dies mid-job loses the job to the others
after --lock-seconds. Each shard is committed exactly once. Exit 2 when the queue cannot be reached.

Options:
${QUEUE_HELP}
  --concurrency N      jobs at once, each on its own thread              (default: 1)
  --lock-seconds S     how long a job stays with a silent worker         (default: 30)
`;

export const workerCommand: Command = {
  name: "worker",
  summary: "take extraction jobs from the queue and write shards, until stopped",
  help: WORKER_HELP,
  async run(argv) {
    const { values } = parseArgs({
      args: argv,
      options: { ...QUEUE_OPTIONS, concurrency: { type: "string" }, "lock-seconds": { type: "string" } },
      strict: true,
      allowPositionals: false,
    });
    const a = parseQueueUrl(values.queue ?? DEFAULT_QUEUE_URL, values.name ?? DEFAULT_QUEUE_NAME);
    const concurrency = numberOption("concurrency", values.concurrency, { integer: true, min: 1 }) ?? 1;
    const lockSeconds = numberOption("lock-seconds", values["lock-seconds"], { min: 0.5 }) ?? 30;
    const w = await runWorker(a, { concurrency, lockSeconds, log: (line) => process.stdout.write(`${line}\n`) });
    let signals = 0;
    const onSignal = (): void => {
      signals++;
      if (signals > 1) {
        process.stdout.write("second signal: stopping now\n");
        process.exit(130);
      }
      process.stdout.write("stopping after the current job\n");
      void w.stop();
      // Closing waits for the current jobs and then for the queue; when the queue has gone away
      // that second wait never ends, so once no job is running, allow 10 s and then stop anyway.
      let idleSince: number | null = null;
      setInterval(() => {
        if (w.activeJobs() > 0) return;
        idleSince ??= Date.now();
        if (Date.now() - idleSince > 10_000) {
          process.stdout.write("could not close the queue connection within 10 s (is the queue still reachable?); stopping now\n");
          process.exit(1);
        }
      }, 500).unref();
    };
    process.on("SIGTERM", onSignal);
    process.on("SIGINT", onSignal);
    await w.stopped;
    process.stdout.write("stopped\n");
    return 0;
  },
};
