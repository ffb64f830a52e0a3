/**
 * Scoring benchmark (`npx tsx tests/bench/scoring.ts`, or through `npm run bench`): scores 10,000
 * generated assessments (seeded, so every run sees the same gates) against the shipped rulesets
 * and prints the median and p99 microseconds per assessment; then evaluates the same rule
 * conditions over the same facts with json-rules-engine as a reference point.
 *
 * The headline figure is a whole assessment of a valid input (scoreParsed: the check against the
 * version, facts and calculators, every rule, HRN, area scores, needs-info and the input hash),
 * which is what submit and the impact list pay per assessment (their input is assembled from
 * documents validated when saved) and what a preview pays after its request body is parsed.
 * The same with the zod parse of an untrusted input in front (score()) is printed beside it.
 * Both ratios are conservative: the reference only evaluates conditions, on facts we built for
 * it outside its timing. The conditions-only ratio compares like with like.
 *
 * Targets: median at most 50 µs, and json-rules-engine at least 10× slower, on the same inputs.
 *
 * On a shared host, memory-heavy work can run markedly slower for stretches of tens of seconds,
 * so the bench prints the median of each stretch of 2,000 in run order. To compare two variants,
 * interleave them in one process, each scoring its own copy of the inputs (whichever touches an
 * input first pays its cache misses). Profile with `node --cpu-prof --import tsx
 * tests/bench/scoring.ts` (the largest `.cpuprofile` is the main thread; the other is tsx's
 * loader); for allocation, `HeapProfiler.startSampling` through `node:inspector`.
 */
import { readFileSync } from 'node:fs';
import { loadavg } from 'node:os';
import { pathToFileURL } from 'node:url';
import {
  AssessmentInputSchema,
  buildFacts,
  compileRuleset,
  loadRulesetFile,
  score,
  scoreParsed,
  type AssessmentInput,
  type LoadedRuleset,
} from '@/lib/rules';
import { generateInput } from '../unit/rules/support/generate-input';
import { createPrng } from '../unit/rules/support/prng';
import { shippedRulesetFiles } from '../unit/rules/support/shipped';
import { flattenFacts, referenceEngineFor } from './json-logic-to-rules-engine';

export interface ScoringBenchFigures {
  /** Median of scoreParsed over valid inputs (see the module comment). */
  medianUs: number;
  p99Us: number;
  referenceMedianUs: number;
  /** json-rules-engine median ÷ our whole-assessment median (above 1: we are faster). */
  ratio: number;
  conditionsMedianUs: number;
  /** json-rules-engine median ÷ our conditions-only median. */
  conditionsRatio: number;
  /** Median of score(): the zod parse of an untrusted input, then the same scoring. */
  untrustedMedianUs: number;
  /** json-rules-engine median ÷ the score() median. */
  untrustedRatio: number;
  /** Process CPU time per assessment over the whole scoring loop: less sensitive to a busy machine than wall time. */
  cpuMeanUs: number;
  /** Medians of consecutive stretches of the scoring loop, in run order: shows the machine's speed drifting within a run. */
  stretchMediansUs: number[];
  assessments: number;
  untranslatedRules: number;
}

/** The targets: median per assessment, and how many times slower json-rules-engine must be. */
export const MEDIAN_TARGET_US = 50;
export const RATIO_TARGET = 10;

const ASSESSMENTS = 10_000;
const STRETCH = 2_000;
const WARM_UP = 1_000;
const SEED = 20_260_101;

const percentile = (sorted: number[], p: number) =>
  sorted[Math.min(sorted.length - 1, Math.floor(p * sorted.length))] as number;
const micros = (start: bigint) => Number(process.hrtime.bigint() - start) / 1000;
const round2 = (n: number) => Math.round(n * 100) / 100;

interface Case {
  ruleset: LoadedRuleset;
  input: AssessmentInput;
}

function generateCases(rulesets: LoadedRuleset[]): Case[] {
  const rng = createPrng(SEED);
  return Array.from({ length: ASSESSMENTS }, () => {
    const ruleset = rng.pick(rulesets);
    return { ruleset, input: generateInput(rng, ruleset.version) };
  });
}

/** A fixed piece of work, so figures from a busy machine can be read against an idle one. */
function calibrationUs(): number {
  const sample = Object.fromEntries(
    Array.from({ length: 50 }, (_, i) => [`key${i}`, { value: i * 1.5, unit: 'mm' }]),
  );
  const runs = 20_000;
  const start = process.hrtime.bigint();
  for (let i = 0; i < runs; i++) JSON.stringify(sample);
  return round2(micros(start) / runs);
}

/** Runs the benchmark and returns its figures (also printed). */
export async function runScoringBench(): Promise<ScoringBenchFigures> {
  const calibration = calibrationUs();
  const rulesets = shippedRulesetFiles().map((file) => loadRulesetFile(readFileSync(file, 'utf8'), file));
  const cases = generateCases(rulesets);

  // Valid inputs, as the schema hands them to an endpoint (the parse is not timed here).
  const valid = cases.map((c) => AssessmentInputSchema.parse(c.input));
  for (let i = 0; i < WARM_UP; i++) scoreParsed(valid[i]!, cases[i]!.ruleset);
  const ours: number[] = [];
  const cpuBefore = process.cpuUsage();
  for (let i = 0; i < cases.length; i++) {
    const start = process.hrtime.bigint();
    scoreParsed(valid[i]!, cases[i]!.ruleset);
    ours.push(micros(start));
  }
  const cpu = process.cpuUsage(cpuBefore);
  const cpuMeanUs = (cpu.user + cpu.system) / cases.length;
  const stretchMediansUs: number[] = [];
  for (let from = 0; from < ours.length; from += STRETCH) {
    const stretch = ours.slice(from, from + STRETCH).sort((a, b) => a - b);
    stretchMediansUs.push(round2(percentile(stretch, 0.5)));
  }

  for (const c of cases.slice(0, WARM_UP)) score(c.input, c.ruleset);
  const untrusted: number[] = [];
  for (const c of cases) {
    const start = process.hrtime.bigint();
    score(c.input, c.ruleset);
    untrusted.push(micros(start));
  }

  const facts = cases.map((c) => buildFacts(c.input).facts);
  const conditionsOnly: number[] = [];
  let sink = 0;
  for (let pass = 0; pass < 2; pass++) {
    cases.forEach((c, i) => {
      const compiled = compileRuleset(c.ruleset.version, c.ruleset.contentSha256);
      const start = process.hrtime.bigint();
      for (const rule of compiled.rules) if (rule.condition(facts[i])) sink += 1;
      if (pass === 1) conditionsOnly.push(micros(start));
    });
  }

  const engines = new Map(rulesets.map((r) => [r, referenceEngineFor(r.version)]));
  const flat = facts.map((f) => flattenFacts(f));
  const reference: number[] = [];
  for (let i = 0; i < WARM_UP; i++) await engines.get(cases[i]!.ruleset)!.engine.run(flat[i]);
  for (let i = 0; i < cases.length; i++) {
    const { engine } = engines.get(cases[i]!.ruleset)!;
    const start = process.hrtime.bigint();
    await engine.run(flat[i]);
    reference.push(micros(start));
  }

  for (const list of [ours, conditionsOnly, reference, untrusted]) list.sort((a, b) => a - b);
  const medianUs = percentile(ours, 0.5);
  const referenceMedianUs = percentile(reference, 0.5);
  const conditionsMedianUs = percentile(conditionsOnly, 0.5);
  const untranslated = [...engines.values()].flatMap((e) => e.untranslated);
  const figures: ScoringBenchFigures = {
    medianUs: round2(medianUs),
    p99Us: round2(percentile(ours, 0.99)),
    referenceMedianUs: round2(referenceMedianUs),
    ratio: round2(referenceMedianUs / medianUs),
    conditionsMedianUs: round2(conditionsMedianUs),
    conditionsRatio: round2(referenceMedianUs / conditionsMedianUs),
    untrustedMedianUs: round2(percentile(untrusted, 0.5)),
    untrustedRatio: round2(referenceMedianUs / percentile(untrusted, 0.5)),
    cpuMeanUs: round2(cpuMeanUs),
    stretchMediansUs,
    assessments: cases.length,
    untranslatedRules: untranslated.length,
  };

  console.log(
    `Machine: load average ${loadavg()
      .map((l) => l.toFixed(1))
      .join(' ')}; calibration ${calibration} µs per JSON.stringify of a 50-key object`,
  );
  console.log(
    `Scored ${cases.length} generated assessments over ${rulesets.map((r) => `${r.version.family}@${r.version.version}`).join(', ')}`,
  );
  const verdict = (holds: boolean) => (holds ? 'target met' : 'target NOT met');
  console.log(
    `  whole assessment, valid input (scoreParsed): median ${figures.medianUs} µs, p99 ${figures.p99Us} µs — target ≤ ${MEDIAN_TARGET_US} µs: ${verdict(figures.medianUs <= MEDIAN_TARGET_US)}`,
  );
  console.log(
    `  medians of each stretch of ${STRETCH.toLocaleString('en')}, in run order: ${stretchMediansUs.join(', ')} µs (a shared host can slow a stretch down)`,
  );
  console.log(`  CPU time per assessment (mean, whole loop): ${figures.cpuMeanUs} µs`);
  console.log(
    `  with the zod parse of an untrusted input in front (score()): median ${figures.untrustedMedianUs} µs — target ≤ ${MEDIAN_TARGET_US} µs: ${verdict(figures.untrustedMedianUs <= MEDIAN_TARGET_US)}`,
  );
  console.log(`  conditions only:  median ${figures.conditionsMedianUs} µs (checksum ${sink})`);
  console.log(`  json-rules-engine, same conditions and facts: median ${figures.referenceMedianUs} µs`);
  console.log(
    `  ratio json-rules-engine ÷ ours: ${figures.ratio}× whole assessment — target ≥ ${RATIO_TARGET}×: ${verdict(figures.ratio >= RATIO_TARGET)}`,
  );
  console.log(
    `  ratio json-rules-engine ÷ score() with the parse: ${figures.untrustedRatio}× — target ≥ ${RATIO_TARGET}×: ${verdict(figures.untrustedRatio >= RATIO_TARGET)}; conditions only: ${figures.conditionsRatio}×`,
  );
  console.log(
    `  not translatable to json-rules-engine (need if/min arithmetic): ${[...new Set(untranslated)].join(', ') || 'none'}`,
  );
  return figures;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  await runScoringBench();
}
