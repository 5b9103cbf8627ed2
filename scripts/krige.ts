// Kriging from the command line, with the same engine as editions:
//
//   npx tsx scripts/krige.ts JOB.json        (or the job on standard input: `… < JOB.json`, or `-`)
//
// Writes the JSON result to standard output. A bad job (missing fields, wrong lengths,
// non-finite numbers, too few points for the model, duplicate locations, collinear drift)
// exits with status 2 and a message naming the field; an unexpected failure exits with 1.
// The job and result formats are described in DEVELOPERS.md ("Geostatistics engine").
import { readFileSync } from "node:fs";
import { isGeostatsError } from "../lib/geostats/errors";
import { KrigeJobError, parseKrigeJob, runKrigeJob } from "../lib/geostats/job";

async function readInput(arg: string | undefined): Promise<string> {
  if (arg && arg !== "-") return readFileSync(arg, "utf8");
  if (process.stdin.isTTY) {
    throw new KrigeJobError(["usage: npx tsx scripts/krige.ts JOB.json (or pipe the job on standard input)"]);
  }
  const chunks: Buffer[] = [];
  for await (const c of process.stdin) chunks.push(c as Buffer);
  return Buffer.concat(chunks).toString("utf8");
}

async function main(): Promise<number> {
  const arg = process.argv[2];
  let text: string;
  try {
    text = await readInput(arg);
  } catch (e) {
    if (e instanceof KrigeJobError) throw e;
    throw new KrigeJobError([`job: cannot read ${arg ?? "standard input"} (${(e as Error).message})`]);
  }
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (e) {
    throw new KrigeJobError([`job: not valid JSON (${(e as Error).message})`]);
  }
  const job = parseKrigeJob(raw);
  const result = await runKrigeJob(job);
  // wait until the (possibly large) result has been handed to the pipe before exiting
  await new Promise<void>((resolve, reject) => process.stdout.write(JSON.stringify(result) + "\n", (e) => (e ? reject(e) : resolve())));
  return 0;
}

main().then(
  (code) => {
    process.exitCode = code;
  },
  (e: unknown) => {
    if (e instanceof KrigeJobError) {
      for (const line of e.issues) console.error(`krige: ${line}`);
      process.exitCode = 2;
    } else if (isGeostatsError(e)) {
      console.error(`krige: ${e.message}`);
      process.exitCode = 2;
    } else {
      console.error(`krige: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}`);
      process.exitCode = 1;
    }
  },
);
