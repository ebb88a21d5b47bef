import semverCompare from 'semver/functions/compare';
import semverParse from 'semver/functions/parse';
import semverSatisfies from 'semver/functions/satisfies';
import Range from 'semver/classes/range';
import type { ConformanceStatus } from '../schemas/software';

/**
 * Software conformance of an asset against a baseline (PRODUCT.md sections 3D and 4).
 *
 * Version order is Semantic Versioning 2.0.0 (semver.org section 11: pre-releases before their
 * release, identifiers compared one by one, build metadata ignored), computed by the `semver`
 * package. A string is taken as a version only when it matches the specification's own regular
 * expression (semver.org, FAQ "Is there a suggested regular expression"): the package alone would
 * also accept a leading "v" or "=" and surrounding spaces, which the specification does not.
 * Real ECU software versions are often not semver ("B07_RC2"): such a string is kept as it is and
 * compared only for equality.
 */

/** semver.org, FAQ: the suggested regular expression for a version (numbered capture groups form). */
const SEMVER_2_0_0 =
  /^(0|[1-9]\d*)\.(0|[1-9]\d*)\.(0|[1-9]\d*)(?:-((?:0|[1-9]\d*|\d*[a-zA-Z-][0-9a-zA-Z-]*)(?:\.(?:0|[1-9]\d*|\d*[a-zA-Z-][0-9a-zA-Z-]*))*))?(?:\+([0-9a-zA-Z-]+(?:\.[0-9a-zA-Z-]+)*))?$/;

/** Longest version string Proofyard stores (a UDS F189 read-out is far shorter in practice). */
export const VERSION_MAX_LENGTH = 64;
/** Longest compatibility range accepted. */
export const RANGE_MAX_LENGTH = 200;

/**
 * Ranges are the `semver` package's range syntax, read with `includePrerelease`: a range is an
 * interval in Semantic Versioning order, so 3.2.0-rc.1 lies within `>=3.1.0 <4` while
 * 4.0.0-alpha does not (`<4` means below every 4.0.0 pre-release). The package's default,
 * made for package managers, would leave every pre-release outside; for ECU compatibility the
 * interval is what counts (the product's own choice).
 */
const RANGE_OPTIONS = { includePrerelease: true } as const;

export function isSemver(version: string): boolean {
  return version.length <= VERSION_MAX_LENGTH && SEMVER_2_0_0.test(version);
}

// Parsed versions, kept because a fleet repeats the same few versions thousands of times.
const PARSED = new Map<string, ReturnType<typeof semverParse>>();
const PARSED_MAX = 10_000;

function parsed(version: string) {
  let value = PARSED.get(version);
  if (value === undefined) {
    value = isSemver(version) ? semverParse(version) : null;
    if (PARSED.size >= PARSED_MAX) PARSED.clear();
    PARSED.set(version, value);
  }
  return value;
}

/** Why a version is not semver, in words a technician can act on; null when it is. */
export function versionProblem(version: string): string | null {
  if (parsed(version)) return null;
  if (/^[vV=]\s*\d/.test(version) && isSemver(version.replace(/^[vV=]\s*/, ''))) {
    return `"${version}" is not a semantic version: drop the leading "${version[0]}".`;
  }
  if (/^\d+\.\d+$/.test(version) || /^\d+$/.test(version)) {
    return `"${version}" is not a semantic version: it needs three numbers, like 1.4.0.`;
  }
  return `"${version}" is not a semantic version (MAJOR.MINOR.PATCH, semver.org): it is compared only for equality.`;
}

/** Why a range does not parse (the `semver` package's own message); null when it does. */
export function rangeProblem(range: string): string | null {
  const text = range.trim();
  if (!text) return 'Enter a range, for example >=3.1.0 <4.';
  if (text.length > RANGE_MAX_LENGTH) return `Use at most ${RANGE_MAX_LENGTH} characters.`;
  try {
    new Range(text, RANGE_OPTIONS);
    return null;
  } catch (err) {
    return `The range does not parse (${(err as Error).message}). Write it like >=3.1.0 <4 or ^3.1.0.`;
  }
}

// Answers of satisfiesRange, kept for the same reason: a roll-up checks the same few versions
// against the same few rule ranges for thousands of assets.
const SATISFIES = new Map<string, boolean>();

/** Whether `version` lies within `range`; null when the version is not semver (nothing to say). Call with a valid range. */
export function satisfiesRange(version: string, range: string): boolean | null {
  if (!parsed(version)) return null;
  const key = `${range}\u0000${version}`;
  let value = SATISFIES.get(key);
  if (value === undefined) {
    value = semverSatisfies(version, range.trim(), RANGE_OPTIONS);
    if (SATISFIES.size >= PARSED_MAX) SATISFIES.clear();
    SATISFIES.set(key, value);
  }
  return value;
}

/** Semantic Versioning 2.0.0 order of two versions, or null when either is not semver. */
export function versionOrder(a: string, b: string): -1 | 0 | 1 | null {
  const pa = parsed(a);
  const pb = parsed(b);
  if (!pa || !pb) return null;
  return semverCompare(pa, pb);
}

export type VersionComparison = {
  /** One of on-baseline, behind, ahead, missing or not-comparable (rule-broken needs a whole asset: see `conformance`). */
  status: Exclude<ConformanceStatus, 'rule-broken'>;
  /** -1 installed is older, 0 same (build metadata ignored), 1 newer; null when either is not semver or nothing is installed. */
  order: -1 | 0 | 1 | null;
  /** Whether the installed version lies within `range`; null without a range, or when the installed version is not semver. */
  satisfiesRange: boolean | null;
  /** Why the comparison says less than it might (a version that is not semver), for the screen. */
  note: string | null;
};

/**
 * Installed against target. Two strings that are not both semver are compared only for
 * equality: the same raw string is on-baseline (order null), any other is not-comparable.
 * Nothing installed (null or empty) is missing. Call with a valid range (see `rangeProblem`).
 */
export function compareVersions(installed: string | null | undefined, target: string, range?: string | null): VersionComparison {
  const hasRange = range !== undefined && range !== null && range.trim() !== '';
  if (installed === null || installed === undefined || installed === '') {
    return { status: 'missing', order: null, satisfiesRange: hasRange ? false : null, note: null };
  }
  const satisfies = hasRange ? satisfiesRange(installed, range) : null;
  const order = versionOrder(installed, target);
  if (order === null) {
    const note = versionProblem(installed) ?? versionProblem(target);
    return { status: installed === target ? 'on-baseline' : 'not-comparable', order: null, satisfiesRange: satisfies, note };
  }
  return { status: order === 0 ? 'on-baseline' : order < 0 ? 'behind' : 'ahead', order, satisfiesRange: satisfies, note: null };
}

// ---- A whole asset --------------------------------------------------------------------------

export type CompatibilityRule = {
  id: string;
  /** When this ECU is at or above `whenMinVersion` ... */
  whenEcuId: string;
  whenMinVersion: string;
  /** ... this ECU must lie within `range`. */
  thenEcuId: string;
  range: string;
};

export type BaselineForConformance = {
  /** Target version per ECU expected on the asset. */
  targets: ReadonlyArray<{ ecuId: string; version: string }>;
  rules: readonly CompatibilityRule[];
};

/**
 * `broken`: the condition holds and the other ECU lies outside the range. `cannot-check`: the
 * condition holds but the other ECU is not recorded or not semver. `not-triggered`: the first
 * ECU is below the threshold, not recorded, or not semver.
 */
export type RuleState = 'holds' | 'broken' | 'cannot-check' | 'not-triggered';

export type RuleResult = {
  rule: CompatibilityRule;
  state: RuleState;
  whenInstalled: string | null;
  thenInstalled: string | null;
};

export type EcuConformance = {
  ecuId: string;
  installed: string | null;
  target: string | null;
  /** null: no target for this ECU (an ECU installed but not in the baseline) and no rule broken on it. */
  status: ConformanceStatus | null;
  order: -1 | 0 | 1 | null;
  note: string | null;
  /** Rules that this ECU breaks (as the ECU that must lie within the range). */
  rulesBroken: RuleResult[];
  /** Counts toward the software part of readiness: on-baseline, or ahead with no broken rule involving it (PRODUCT.md section 4). */
  countsAsOnBaseline: boolean;
};

export type AssetConformance = {
  ecus: EcuConformance[];
  rules: RuleResult[];
  /** ECUs expected by the baseline, and how many of them count as on it: the S part of readiness is onBaseline / expected. */
  expected: number;
  onBaseline: number;
};

export function evaluateRule(rule: CompatibilityRule, installedByEcu: Readonly<Record<string, string | null | undefined>>): RuleResult {
  const whenInstalled = installedByEcu[rule.whenEcuId] || null;
  const thenInstalled = installedByEcu[rule.thenEcuId] || null;
  const result = (state: RuleState): RuleResult => ({ rule, state, whenInstalled, thenInstalled });
  const trigger = whenInstalled === null ? null : versionOrder(whenInstalled, rule.whenMinVersion);
  if (trigger === null || trigger < 0) return result('not-triggered');
  if (thenInstalled === null) return result('cannot-check');
  const within = satisfiesRange(thenInstalled, rule.range);
  if (within === null) return result('cannot-check');
  return result(within ? 'holds' : 'broken');
}

/**
 * Per ECU of the baseline (and per ECU installed beyond it): installed against target, then the
 * compatibility rules. An ECU that breaks a rule is `rule-broken` whatever its own comparison
 * said; an ECU ahead of its target counts as on the baseline only while no broken rule involves it.
 */
export function conformance(
  installedByEcu: Readonly<Record<string, string | null | undefined>>,
  baseline: BaselineForConformance | null,
): AssetConformance {
  const targets = baseline?.targets ?? [];
  const rules = (baseline?.rules ?? []).map((rule) => evaluateRule(rule, installedByEcu));
  const broken = rules.filter((r) => r.state === 'broken');
  const ecuIds = [...targets.map((t) => t.ecuId)];
  for (const [ecuId, version] of Object.entries(installedByEcu)) {
    if (version && !ecuIds.includes(ecuId)) ecuIds.push(ecuId);
  }
  const targetOf = new Map(targets.map((t) => [t.ecuId, t.version]));
  const ecus = ecuIds.map((ecuId): EcuConformance => {
    const installed = installedByEcu[ecuId] || null;
    const target = targetOf.get(ecuId) ?? null;
    const rulesBroken = broken.length ? broken.filter((r) => r.rule.thenEcuId === ecuId) : broken;
    const involved = broken.length > 0 && broken.some((r) => r.rule.thenEcuId === ecuId || r.rule.whenEcuId === ecuId);
    const compared = target === null ? null : compareVersions(installed, target);
    const status: ConformanceStatus | null = rulesBroken.length ? 'rule-broken' : (compared?.status ?? null);
    return {
      ecuId,
      installed,
      target,
      status,
      order: compared?.order ?? null,
      note: compared?.note ?? (installed && !isSemver(installed) ? versionProblem(installed) : null),
      rulesBroken,
      countsAsOnBaseline: target !== null && (status === 'on-baseline' || (status === 'ahead' && !involved)),
    };
  });
  return {
    ecus,
    rules,
    expected: targets.length,
    onBaseline: ecus.filter((e) => e.countsAsOnBaseline).length,
  };
}

/** How a target moved between two baselines. */
export type TargetChange = 'added' | 'removed' | 'upgraded' | 'downgraded' | 'changed' | 'same';

export function targetChange(from: string | null, to: string | null): TargetChange {
  if (from === null) return to === null ? 'same' : 'added';
  if (to === null) return 'removed';
  if (from === to) return 'same';
  const order = versionOrder(to, from);
  if (order === null) return 'changed';
  return order > 0 ? 'upgraded' : order < 0 ? 'downgraded' : 'same';
}
