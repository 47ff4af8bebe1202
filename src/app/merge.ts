/**
 * `singleshot merge DIR... --out DIR`: the folders of `run --shard K/N` put back together into
 * the folder the unsharded run would have written, byte for byte.
 *
 * Checks first: every folder holds a finished run of this singleshot version; all ran the same
 * scenario (canonical JSON), seed and engine; their shards are parts of the same N and cover
 * every part exactly once. Then, per point: the calibrations agree (every shard calibrated on the
 * same shots), the scored batch ranges follow each other without gap or overlap, and the tally
 * trees are pushed in shard order, which rebuilds exactly the unsharded tree
 * (analysis/tally-tree.ts). The summary, budget and comparison tables are recomputed from those
 * tallies by the same code as `run`; shots.arrow and traces.arrow are concatenated record
 * batch by record batch, point by point in shard order.
 */
import { open } from 'node:fs/promises';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { Data, makeData, RecordBatch, RecordBatchReader, Schema, Struct, type Vector } from 'apache-arrow';
import { InputError } from '../errors.ts';
import { mergePairTallies } from '../analysis/compare.ts';
import { pushNode, type TallyNode } from '../analysis/tally-tree.ts';
import { batchCount } from '../run/batches.ts';
import { type RunResult } from '../run/run-points.ts';
import { finishPoint, setUpPoint, type PointResult } from '../run/point-result.ts';
import { compilePoint } from '../engine/compile-point.ts';
import { resolveScenario } from '../scenario/resolve.ts';
import type { SweepSpec } from '../scenario/types.ts';
import type { Scenario } from '../scenario/types.ts';
import { ArrowFileStream } from '../io/arrow-sink.ts';
import { checkArrowFile } from '../io/arrow-read.ts';
import { parseShardText, writeManifest, MANIFEST, type Manifest } from '../io/manifest.ts';
import { openRunFolder } from './run-folder.ts';
import { META_PREFIX, TOOL_VERSION, type RunProvenance } from '../io/metadata.ts';
import { OutputFolder } from '../io/output-dir.ts';
import { checkpoint, RunInterrupted } from '../run/interrupt.ts';
import { writeResultTables } from './result-tables.ts';
import { readTallies, runTallies, TALLIES, writeTallies, type PointTallies, type RunTallies } from './tallies.ts';
import { encodeData } from '../io/plain-data.ts';
import { expandPoints } from './run-to-directory.ts';
import { writeReport } from './report.ts';

/** Tables a merge concatenates (when the shards have them). */
const STREAMED_TABLES = ['shots.arrow', 'traces.arrow'] as const;

export interface MergeOptions {
  /** The shard folders, in any order. */
  dirs: string[];
  outDir: string;
  force?: boolean;
  /** Write report.html when the shards have one (default true). */
  report?: boolean;
  /** Aborting it stops the merge between record batches (RunInterrupted); the output folder is left as it was. */
  signal?: AbortSignal;
}

export interface MergeResult {
  result: RunResult;
  files: string[];
  /** The shard folders in shard order. */
  shards: string[];
  /** The scenario's sweep section (absent when nothing is swept). */
  sweep?: SweepSpec;
}

interface Shard {
  dir: string;
  manifest: Manifest;
  k: number;
  n: number;
  tallies: RunTallies;
}

function where(dir: string): string {
  return join(dir, MANIFEST);
}

/** The "K/N" of a checked run.json (readManifest refuses any other). */
function parseShard(m: Manifest): { k: number; n: number } {
  return parseShardText(m.shard)!;
}

/** The trace kind and record layout of a shard's traces.arrow (its schema's fields and kind). */
async function tracesLayoutOf(dir: string): Promise<string> {
  const schema = await checkArrowFile(join(dir, 'traces.arrow'), 'traces', ['point', 'shot']);
  const kind = schema.metadata.get(`${META_PREFIX}trace_kind`) ?? 'none';
  return `${kind}: ${schema.fields.map((f) => `${f.name} ${String(f.type)}`).join(', ')}`;
}

/**
 * Reads and checks the shards (each folder whole: run.json, checksums, metadata; run-folder.ts);
 * returns them in shard order.
 */
export async function checkShards(dirs: readonly string[]): Promise<Shard[]> {
  if (dirs.length === 0) throw new InputError('merge', '', 'at least one shard folder');
  const shards: Shard[] = [];
  for (const dir of dirs) {
    const { manifest } = await openRunFolder(dir);
    shards.push({ dir, manifest, ...parseShard(manifest), tallies: null as unknown as RunTallies });
  }
  const a = shards[0]!;
  for (const s of shards) {
    const m = s.manifest;
    if (m.version !== TOOL_VERSION) {
      throw new InputError(where(s.dir), 'version', `a run made by singleshot ${TOOL_VERSION} (this version)`, `version ${m.version}`);
    }
    if (m.seed !== a.manifest.seed) {
      throw new InputError(where(s.dir), 'seed', `seed ${a.manifest.seed} like ${a.dir} (shards of one run share the seed)`, `seed ${m.seed}: a shard of another run`);
    }
    if (m.scenario !== a.manifest.scenario) {
      throw new InputError(where(s.dir), 'scenario', `the scenario of ${a.dir}`, 'a different scenario: a shard of another run');
    }
    if (m.engine !== a.manifest.engine) {
      throw new InputError(where(s.dir), 'engine', `the ${a.manifest.engine} engine like ${a.dir}`, `the ${m.engine} engine`);
    }
    if (s.n !== a.n) throw new InputError(where(s.dir), 'shard', `a part of ${a.n} like ${a.dir} (shard ${a.manifest.shard})`, `shard ${m.shard}`);
    for (const t of STREAMED_TABLES) {
      if (m.files.includes(t) !== a.manifest.files.includes(t)) {
        throw new InputError(where(s.dir), 'files', `${t} ${a.manifest.files.includes(t) ? 'present' : 'absent'} like in ${a.dir}`, m.files.includes(t) ? 'present' : 'absent');
      }
    }
    if (m.refine !== undefined) throw new InputError(where(s.dir), 'refine', 'a shard (a refined run is never sharded)', 'a refined run');
  }
  // kept traces of one kind and one layout (raw or baseband, the same record length)
  if (a.manifest.files.includes('traces.arrow')) {
    const first = await tracesLayoutOf(a.dir);
    for (const s of shards) {
      const layout = await tracesLayoutOf(s.dir);
      if (layout !== first) throw new InputError(join(s.dir, 'traces.arrow'), '', `traces kept like ${a.dir}'s (${first.slice(0, 60)})`, layout.slice(0, 60));
    }
  }
  const byK = new Map<number, Shard>();
  for (const s of shards) {
    const seen = byK.get(s.k);
    if (seen) throw new InputError(where(s.dir), 'shard', `each shard once`, `shard ${s.k}/${s.n} again (also in ${seen.dir})`);
    byK.set(s.k, s);
  }
  const missing = Array.from({ length: a.n }, (_, i) => i + 1).filter((k) => !byK.has(k));
  if (missing.length > 0) {
    throw new InputError('merge', '', `all ${a.n} shards of the run`, `no shard ${missing.map((k) => `${k}/${a.n}`).join(', ')} among the ${shards.length} folder${shards.length === 1 ? '' : 's'} given`);
  }
  const ordered = [...byK.keys()].sort((x, y) => x - y).map((k) => byK.get(k)!);
  for (const s of ordered) {
    s.tallies = readTallies(s.dir, s.manifest);
    const t = s.tallies;
    if (t.seed !== s.manifest.seed || t.scenario !== s.manifest.scenario || t.engine !== s.manifest.engine || t.version !== s.manifest.version) {
      throw new InputError(join(s.dir, TALLIES), '', `tallies of the run in ${where(s.dir)}`, 'tallies of another run');
    }
  }
  return ordered;
}

/** The merged tallies of one point across the shards (in shard order). */
function mergePoint(shards: readonly Shard[], k: number, totalBatches: number): Omit<PointTallies, 'calibrations'> & { calibrations: PointTallies['calibrations'] } {
  const parts = shards.map((s) => s.tallies.points[k]!);
  const first = parts[0]!;
  const calibration = JSON.stringify(encodeData(first.calibrations));
  let end = 0;
  const stacks: TallyNode[][] = first.stacks.map(() => []);
  let pairs = first.pairs.map((p) => ({ a: p.a, b: p.b, counts: { bothWrong: 0, onlyAWrong: 0, onlyBWrong: 0, n: 0 } }));
  const counts: Record<string, number> = {};
  parts.forEach((part, i) => {
    const dir = shards[i]!.dir;
    const file = join(dir, TALLIES);
    if (part.index !== first.index) throw new InputError(file, `points[${k}]`, `point ${first.index} like ${shards[0]!.dir}`, `point ${part.index}`);
    if (JSON.stringify(encodeData(part.calibrations)) !== calibration) {
      throw new InputError(file, `points[${k}].calibrations`, `the calibration of ${shards[0]!.dir} (every shard calibrates on the same shots)`, 'a different one');
    }
    const [a, b] = part.batches;
    if (a !== end) throw new InputError(file, `points[${k}].batches`, `scored batches from ${end}`, `batches [${a}, ${b})`);
    end = b;
    part.stacks.forEach((stack, p) => {
      for (const node of stack) {
        try {
          pushNode(stacks[p]!, node);
        } catch (e) {
          throw new InputError(file, `points[${k}].stacks`, 'tally nodes that follow the previous shard', (e as Error).message);
        }
      }
    });
    pairs = mergePairTallies(pairs, part.pairs);
    for (const [key, v] of Object.entries(part.counts)) counts[key] = (counts[key] ?? 0) + v;
  });
  if (end !== totalBatches) throw new InputError('merge', `point ${first.index}`, `scored batches [0, ${totalBatches})`, `[0, ${end})`);
  return { index: first.index, batches: [0, end], calibrations: first.calibrations, stacks, pairs, counts };
}

/** Checks a shard's tallies of point k against the point's scenario: pipelines, states, weights, batch range. */
function checkPointTallies(file: string, k: number, part: PointTallies, sc: Scenario): void {
  const at = `points[${k}]`;
  const pipelines = sc.pipelines.length, states = sc.states.length;
  if (part.stacks.length !== pipelines) throw new InputError(file, `${at}.stacks`, `one stack per pipeline (${pipelines})`, `${part.stacks.length}`);
  if (part.calibrations.length !== pipelines) throw new InputError(file, `${at}.calibrations`, `one calibration per pipeline (${pipelines})`, `${part.calibrations.length}`);
  if (part.batches[1] > batchCount(sc, 'score')) throw new InputError(file, `${at}.batches`, `batches of the point's ${batchCount(sc, 'score')}`, `[${part.batches[0]}, ${part.batches[1]})`);
  part.stacks.forEach((stack, p) => stack.forEach((node, j) => {
    if (node.tally.states !== states) throw new InputError(file, `${at}.stacks[${p}][${j}].tally.states`, `the scenario's ${states} states`, String(node.tally.states));
  }));
  part.calibrations.forEach((c, p) => {
    const weighted = sc.pipelines[p]!.weights !== undefined && sc.pipelines[p]!.weights !== 'boxcar';
    if (weighted !== (c.weights !== null)) throw new InputError(file, `${at}.calibrations[${p}].weights`, weighted ? 'calibrated weights' : 'null (boxcar weights)', c.weights === null ? 'null' : 'weights');
  });
}

/** A dictionary's first words, as a message shows them. */
function dictionaryWords(d: Vector): string {
  const words = Array.from(d.toArray() as ArrayLike<unknown>, (w) => JSON.stringify(String(w).slice(0, 20)));
  return words.length > 6 ? `${words.slice(0, 6).join(', ')}, …` : words.join(', ');
}

/**
 * A record batch whose dictionary columns use the given dictionaries (so a writer writes them
 * once); a shard whose dictionary differs from the first one's is refused, naming its `path`.
 */
function withDictionaries(path: string, batch: RecordBatch, schema: Schema, dictionaries: Map<number, Vector>): RecordBatch {
  const children = batch.data.children.map((child: Data, i: number) => {
    const f = schema.fields[i]!;
    const id = (f.type as { id?: number }).id;
    if (child.dictionary === undefined || id === undefined) return child;
    const known = dictionaries.get(id);
    if (!known) {
      dictionaries.set(id, child.dictionary);
      return child;
    }
    if (known === child.dictionary) return child;
    if (JSON.stringify(known.toArray()) !== JSON.stringify(child.dictionary.toArray())) {
      throw new InputError(path, f.name, `the words the first shard's column has (${dictionaryWords(known)})`, dictionaryWords(child.dictionary));
    }
    return makeData({ type: child.type, offset: child.offset, length: child.length, nullCount: child.nullCount, data: child.values, nullBitmap: child.nullBitmap, dictionary: known } as never);
  });
  return new RecordBatch(schema, makeData({ type: new Struct(schema.fields), length: batch.numRows, nullCount: 0, children }));
}

/** Shots [first, end) of a point that shard `shard` scored, and the pipelines whose rows shots.arrow holds per shot. */
export interface ShotRange {
  first: number;
  end: number;
}

/**
 * Checks one record batch of a shard against the shots it must hold: one point and (in
 * shots.arrow) one pipeline per batch, shot numbers that follow on from the previous batch of
 * that pipeline, inside the shard's range. `next` holds the next expected shot per row group.
 */
function checkBatchShots(path: string, b: RecordBatch, pipelines: readonly string[] | null, range: ShotRange, next: number[]): void {
  const shot = b.getChild('shot'), point = b.getChild('point');
  if (!shot || !point) throw new InputError(path, '', 'the columns point and shot', 'a batch without them');
  let group = 0;
  if (pipelines) {
    const name = String(b.getChild('pipeline')?.get(0));
    group = pipelines.indexOf(name);
    if (group < 0) throw new InputError(path, 'pipeline', `one of the scenario's pipelines (${pipelines.join(', ')})`, JSON.stringify(name.slice(0, 40)));
  }
  const p0 = point.get(0);
  const pipeline = pipelines ? b.getChild('pipeline')! : null;
  for (let i = 0; i < b.numRows; i++) {
    const expected = next[group]! + i;
    if (point.get(i) !== p0) throw new InputError(path, 'point', `point ${String(p0)} in every row of a batch`, `point ${String(point.get(i))}`);
    if (pipeline && String(pipeline.get(i)) !== pipelines![group]) {
      throw new InputError(path, 'pipeline', `pipeline "${pipelines![group]}" in every row of a batch`, JSON.stringify(String(pipeline.get(i)).slice(0, 40)));
    }
    if (Number(shot.get(i)) !== expected) {
      throw new InputError(path, 'shot', `shot ${expected} of point ${String(p0)} next (the shard scored shots [${range.first}, ${range.end}) once each)`, `shot ${String(shot.get(i))}`);
    }
  }
  next[group]! += b.numRows;
  if (next[group]! > range.end) throw new InputError(path, 'shot', `shots below ${range.end} (the shard's range of point ${String(p0)})`, `shot ${next[group]! - 1}`);
}

/** Concatenates one streamed table of the shards, point by point, shard by shard. */
async function concatenateTable(
  name: string, shards: readonly Shard[], pointOrder: readonly number[], out: OutputFolder,
  ranges: (shard: number, point: number) => ShotRange, pipelines: readonly string[], signal?: AbortSignal,
): Promise<void> {
  // hostile files (empty, truncated, foreign, wrong table) are InputErrors before anything is read
  for (const s of shards) await checkArrowFile(join(s.dir, name), name.replace(/\.arrow$/, ''), ['point']);
  const readers = await Promise.all(shards.map(async (s) => {
    const handle = await open(join(s.dir, name), 'r');
    const reader = await RecordBatchReader.from(handle);
    await reader.open();
    return { handle, reader, it: reader[Symbol.asyncIterator](), peeked: null as RecordBatch | null, done: false };
  }));
  const source = readers[0]!.reader.schema;
  const metadata = new Map(source.metadata);
  metadata.set(`${META_PREFIX}shard`, '1/1');
  const schema = new Schema(source.fields, metadata);
  const stream = new ArrowFileStream(out.file(name), schema);
  const dictionaries = new Map<number, Vector>();
  const peek = async (r: (typeof readers)[number]): Promise<RecordBatch | null> => {
    if (!r.peeked && !r.done) {
      const next = await r.it.next();
      if (next.done) r.done = true;
      // a file without record batches reads as one empty placeholder batch: nothing to copy
      else if ((next.value as RecordBatch).numRows > 0) r.peeked = next.value as RecordBatch;
      else return peek(r);
    }
    return r.peeked;
  };
  const pointOf = (b: RecordBatch): number => (schema.fields.some((f) => f.name === 'point') ? Number(b.getChild('point')!.get(0)) : pointOrder[0]!);
  const byPipeline = name === 'shots.arrow' ? pipelines : null;
  try {
    for (const p of pointOrder) {
      for (const [i, r] of readers.entries()) {
        const path = join(shards[i]!.dir, name);
        const range = ranges(i, p);
        const next = (byPipeline ?? [null]).map(() => range.first);
        for (let b = await peek(r); b && pointOf(b) === p; b = await peek(r)) {
          checkBatchShots(path, b, byPipeline, range, next);
          stream.write(withDictionaries(path, b, schema, dictionaries));
          r.peeked = null;
          await checkpoint(signal);
        }
        if (next.some((x) => x !== range.end)) {
          throw new InputError(path, 'shot', `every shot of point ${p} in [${range.first}, ${range.end})${byPipeline ? ' for every pipeline' : ''}`, `rows up to shot ${Math.min(...next)}`);
        }
      }
    }
    for (const [i, r] of readers.entries()) {
      if (await peek(r)) throw new InputError(join(shards[i]!.dir, name), '', 'batches of the points in tallies.json only', 'batches of another point');
    }
    stream.finish();
  } catch (e) {
    stream.abort();
    if (e instanceof InputError || e instanceof RunInterrupted) throw e;
    // the bytes were checked against run.json: a reader failure means the file changed meanwhile
    throw new InputError(join(shards[0]!.dir, name), '', 'a table that reads to the end', `a reader failure (${String((e as Error).message).split('\n')[0]!.slice(0, 100)})`);
  } finally {
    await Promise.all(readers.map((r) => r.handle.close()));
  }
}

/** Merges shard folders into `outDir`. */
export async function mergeRuns(o: MergeOptions): Promise<MergeResult> {
  const shards = await checkShards(o.dirs);
  const a = shards[0]!;
  const label = where(a.dir);
  const doc = JSON.parse(a.manifest.scenario) as unknown;
  const { scenario, warnings } = resolveScenario(doc, label);
  const sweepPoints = expandPoints({ doc, canonical: a.manifest.scenario, scenario, warnings }, label);
  const pointCount = a.tallies.points.length;
  for (const s of shards) {
    if (s.tallies.points.length !== pointCount) throw new InputError(join(s.dir, TALLIES), 'points', `${pointCount} points like ${a.dir}`, String(s.tallies.points.length));
  }
  const merged = Array.from({ length: pointCount }, (_, k) => {
    const index = a.tallies.points[k]!.index;
    const sp = sweepPoints[index];
    if (!sp) throw new InputError(join(a.dir, TALLIES), `points[${k}]`, `a point of the scenario's ${sweepPoints.length}`, `point ${index}`);
    for (const s of shards) checkPointTallies(join(s.dir, TALLIES), k, s.tallies.points[k]!, sp.scenario);
    return { sp, tallies: mergePoint(shards, k, batchCount(sp.scenario, 'score')) };
  });
  const points: PointResult[] = merged.map(({ sp, tallies }, k) => {
    const compiled = compilePoint(sp.scenario);
    tallies.calibrations.forEach((c, p) => {
      const bins = compiled.pipelines[p]!.chain.bins;
      if (c.weights && c.weights.length !== bins) {
        throw new InputError(join(a.dir, TALLIES), `points[${k}].calibrations[${p}].weights`, `${bins} weights (one per bin of the pipeline)`, `${c.weights.length}`);
      }
    });
    const r = setUpPoint(tallies.index, sp, tallies.calibrations, compiled);
    r.tallyStacks = tallies.stacks;
    r.pairs = tallies.pairs;
    Object.assign(r, tallies.counts);
    finishPoint(r);
    return r;
  });
  await checkpoint(o.signal);
  const out = OutputFolder.open(o.outDir, { force: o.force ?? false, command: 'merge', inputs: o.dirs.map((d) => ({ path: d, kind: 'folder' as const })) });
  const m = a.manifest;
  const mergedFrom = shards.map((s) => s.dir);
  const files: string[] = [];
  try {
    const provenance: RunProvenance = { scenario: m.scenario, seed: m.seed, engine: m.engine, engineReason: m.engineReason, shard: '1/1' };
    const order = points.map((p) => p.index);
    for (const t of STREAMED_TABLES) {
      if (!m.files.includes(t)) continue;
      await concatenateTable(t, shards, order, out, (i, p) => {
        const k = merged.findIndex((x) => x.tallies.index === p);
        const [first, end] = shards[i]!.tallies.points[k]!.batches;
        const sc = merged[k]!.sp.scenario;
        return { first: first * sc.batchSize, end: Math.min(sc.shots, end * sc.batchSize) };
      }, scenario.pipelines.map((x) => x.name), o.signal);
      files.push(t);
    }
    files.push(...writeResultTables(out.work, points, provenance, points[0]!.scenario.signal.unit, sweepPoints[0]!.units ?? {}));
    const tallies = runTallies(points, merged.map((x) => x.tallies.batches), { seed: m.seed, engine: m.engine, scenario: m.scenario });
    writeTallies(out.work, tallies);
    files.push(TALLIES);
    writeManifest(out.work, { complete: true, seed: m.seed, engine: m.engine, engineReason: m.engineReason, shard: '1/1', files, scenario: m.scenario, mergedFrom });
    if (o.report !== false && existsSync(join(a.dir, 'report.html'))) await writeReport(out.work, out.file('report.html'), o.signal);
    await checkpoint(o.signal);
    out.publish();
  } catch (e) {
    out.discard();
    if (e instanceof RunInterrupted) throw new RunInterrupted(e.signal, `${o.outDir} was left as it was`);
    throw out.userError(e);
  }
  const result: RunResult = { points, engine: m.engine, engineReason: m.engineReason ?? '' };
  return { result, files, shards: mergedFrom, sweep: scenario.sweep };
}
