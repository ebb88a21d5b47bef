import semver from 'semver';
import {
  compareVersions,
  conformance,
  isSemver,
  rangeProblem,
  satisfiesRange,
  targetChange,
  versionOrder,
  type CompatibilityRule,
} from '../../shared/domain/software';
import { RuleInputSchema, SoftwareVersionSchema, VersionCompareQuerySchema } from '../../shared/schemas/software';

// The reference implementation named by shared REFERENCES.md: the `semver` package (7.7.3), used
// with the same range option as the product (includePrerelease: a range is an interval in
// Semantic Versioning order).
const reference = {
  compare: (a: string, b: string) => semver.compare(a, b),
  satisfies: (v: string, r: string) => semver.satisfies(v, r, { includePrerelease: true }),
};

// Semantic Versioning 2.0.0, section 11 (semver.org): "Example: 1.0.0-alpha < 1.0.0-alpha.1 <
// 1.0.0-alpha.beta < 1.0.0-beta < 1.0.0-beta.2 < 1.0.0-beta.11 < 1.0.0-rc.1 < 1.0.0."
const SPEC_CHAIN = ['1.0.0-alpha', '1.0.0-alpha.1', '1.0.0-alpha.beta', '1.0.0-beta', '1.0.0-beta.2', '1.0.0-beta.11', '1.0.0-rc.1', '1.0.0'];

describe('version order (Semantic Versioning 2.0.0, semver.org section 11; the semver package as the reference)', () => {
  const adjacent = SPEC_CHAIN.slice(1).map((b, i) => [SPEC_CHAIN[i], b] as const);

  it.each(adjacent)('when %s is installed and %s is the target, then it is behind (source: semver.org section 11, the example chain)', (a, b) => {
    expect(versionOrder(a, b)).toBe(-1);
    expect(versionOrder(b, a)).toBe(1);
    expect(compareVersions(a, b)).toEqual({ status: 'behind', order: -1, satisfiesRange: null, note: null });
    expect(compareVersions(b, a).status).toBe('ahead');
    // Reference: the semver package orders the same pair the same way.
    expect(reference.compare(a, b)).toBe(-1);
  });

  it('when every pair of the chain is compared, then the order matches the chain and the semver package (source: semver.org section 11)', () => {
    for (let i = 0; i < SPEC_CHAIN.length; i += 1) {
      for (let j = 0; j < SPEC_CHAIN.length; j += 1) {
        const expected = Math.sign(i - j);
        expect({ pair: [SPEC_CHAIN[i], SPEC_CHAIN[j]], order: versionOrder(SPEC_CHAIN[i], SPEC_CHAIN[j]) }).toEqual({ pair: [SPEC_CHAIN[i], SPEC_CHAIN[j]], order: expected });
        expect(reference.compare(SPEC_CHAIN[i], SPEC_CHAIN[j])).toBe(expected);
      }
    }
  });

  it.each([
    ['1.0.0', '2.0.0', 'semver.org section 11.2: 1.0.0 < 2.0.0'],
    ['2.0.0', '2.1.0', 'semver.org section 11.2: 2.0.0 < 2.1.0'],
    ['2.1.0', '2.1.1', 'semver.org section 11.2: 2.1.0 < 2.1.1'],
    ['1.0.0-alpha', '1.0.0', 'semver.org section 11.3: 1.0.0-alpha < 1.0.0'],
    ['1.9.0', '1.10.0', 'semver.org section 11.2: numeric, not text, comparison'],
    ['1.0.0-beta.9', '1.0.0-beta.10', 'semver.org section 11.4.1: numeric identifiers compare numerically'],
    ['1.0.0-1', '1.0.0-alpha', 'semver.org section 11.4.3: numeric identifiers sort before alphanumeric ones'],
  ])('when %s is compared with %s, then it is older (%s; cross-checked with the semver package)', (a, b) => {
    expect(versionOrder(a, b)).toBe(-1);
    expect(reference.compare(a, b)).toBe(-1);
  });

  it.each([
    ['1.0.0+a', '1.0.0+b', 'REFERENCES.md: build metadata does not count'],
    ['1.0.0-alpha+001', '1.0.0-alpha', 'semver.org section 10: 1.0.0-alpha+001'],
    ['1.0.0+20130313144700', '1.0.0', 'semver.org section 10: 1.0.0+20130313144700'],
    ['1.0.0-beta+exp.sha.5114f85', '1.0.0-beta+other', 'semver.org section 10: 1.0.0-beta+exp.sha.5114f85'],
  ])('when %s is compared with %s, then they are the same version (%s; semver package compare gives 0)', (a, b) => {
    expect(compareVersions(a, b)).toEqual({ status: 'on-baseline', order: 0, satisfiesRange: null, note: null });
    expect(reference.compare(a, b)).toBe(0);
  });
});

describe('what counts as a semantic version (semver.org: the specification and its suggested regular expression)', () => {
  it.each(['1.2.3', '0.0.0', '10.20.30', '1.0.0-rc.1+build.1', '1.1.2-prerelease+meta', '1.0.0-0A.is.legal', '2.0.0+build.1848'])(
    'when %s is checked, then it is semver (semver.org FAQ regular expression, valid examples)',
    (v) => {
      expect(isSemver(v)).toBe(true);
      expect(semver.valid(v)).not.toBeNull();
    },
  );

  it.each([
    ['v1.2.3', 'semver.org FAQ: "v1.2.3" is not a semantic version (the semver package accepts it; Proofyard does not)'],
    ['1.2', 'semver.org section 2: X.Y.Z, three numbers'],
    ['01.2.3', 'semver.org section 2: no leading zeros'],
    ['1.2.3-01', 'semver.org section 9: numeric pre-release identifiers have no leading zeros'],
    ['1.2.3-', 'semver.org section 9: identifiers must not be empty'],
    [' 1.2.3', 'semver.org FAQ regular expression: no spaces'],
    ['B07_RC2', 'an ECU supplier release name: not semver'],
  ])('when %s is checked, then it is not semver (%s)', (v) => {
    expect(isSemver(v)).toBe(false);
    expect(compareVersions(v, '1.2.3').status).toBe('not-comparable');
  });
});

describe('each status of one ECU against its target', () => {
  it.each([
    ['on-baseline', '4.2.1', '4.2.1', 0],
    ['behind', '4.1.3', '4.2.1', -1],
    ['ahead', '4.2.2', '4.2.1', 1],
    ['not-comparable', 'B07_RC2', '3.2.0', null],
    ['not-comparable', '3.2.0', 'B07_RC2', null],
    ['on-baseline', 'ACM_SW_0412', 'ACM_SW_0412', null],
    ['not-comparable', 'ACM_SW_0398', 'ACM_SW_0412', null],
  ] as const)('when the result should be %s (installed %s, target %s), then order is %s', (status, installed, target, order) => {
    const result = compareVersions(installed, target);
    expect(result.status).toBe(status);
    expect(result.order).toBe(order);
    if (order === null && status === 'not-comparable') expect(result.note).toMatch(/not a semantic version/);
  });

  it('when nothing is installed, then the status is missing', () => {
    expect(compareVersions(null, '1.0.0')).toEqual({ status: 'missing', order: null, satisfiesRange: null, note: null });
    expect(compareVersions('', '1.0.0').status).toBe('missing');
  });
});

describe('ranges (the semver package range syntax, includePrerelease; cross-checked with the package)', () => {
  it.each([
    ['3.1.0', '>=3.1.0 <4', true, 'PRODUCT.md section 3D example range, lower bound included'],
    ['3.9.9', '>=3.1.0 <4', true, 'inside'],
    ['4.0.0', '>=3.1.0 <4', false, 'upper bound excluded'],
    ['3.0.9', '>=3.1.0 <4', false, 'below'],
    ['3.2.0-rc.1', '>=3.1.0 <4', true, 'a pre-release inside the interval (includePrerelease)'],
    ['4.0.0-alpha', '>=3.1.0 <4', false, '<4 excludes every 4.0.0 pre-release (it reads as <4.0.0-0)'],
    ['3.1.0-rc.1', '>=3.1.0 <4', false, 'semver.org section 11.3: 3.1.0-rc.1 < 3.1.0'],
    ['1.2.9', '^1.2.3', true, 'caret: same major'],
    ['2.0.0', '^1.2.3', false, 'caret: next major excluded'],
    ['1.2.9', '~1.2.3', true, 'tilde: same minor'],
    ['1.3.0', '~1.2.3', false, 'tilde: next minor excluded'],
    ['5.0.0', '1.x || >=5', true, 'a union of ranges'],
  ])('when %s is checked against %s, then it is %s (%s)', (version, range, expected) => {
    expect(satisfiesRange(version, range)).toBe(expected);
    expect(reference.satisfies(version, range)).toBe(expected);
    expect(compareVersions(version, version, range).satisfiesRange).toBe(expected);
  });

  it('when the version is not semver, then whether it satisfies a range is unknown (null)', () => {
    expect(satisfiesRange('B07_RC2', '>=3.1.0 <4')).toBeNull();
    expect(compareVersions('B07_RC2', '3.2.0', '>=3.1.0 <4').satisfiesRange).toBeNull();
  });

  it.each(['banana', '>=a.b.c', '>= 1.2.3-', '1.2.3 - '])('when the range %s is checked, then it is refused with the reason', (range) => {
    expect(rangeProblem(range)).toMatch(/does not parse \(Invalid comparator/);
    expect(semver.validRange(range)).toBeNull();
    const parsed = RuleInputSchema.safeParse({ whenEcuId: crypto.randomUUID(), whenMinVersion: '4.2.0', thenEcuId: crypto.randomUUID(), range });
    expect(parsed.success).toBe(false);
    expect(parsed.error!.issues.map((i) => i.path.join('.'))).toEqual(['range']);
  });

  it.each(['>=3.1.0 <4', '^3.1.0', '3.x', '>=3.1.0-0 <4.0.0-0', '1.2.3 - 2.3.4'])('when the range %s is checked, then it parses', (range) => {
    expect(rangeProblem(range)).toBeNull();
    expect(semver.validRange(range)).not.toBeNull();
  });
});

describe('conformance of a whole asset (PRODUCT.md sections 3D and 4)', () => {
  // PRODUCT.md section 3D: the front zone controller at 4.2.0 or later needs the body controller within >=3.1.0 <4.
  const rule: CompatibilityRule = { id: 'r1', whenEcuId: 'FZC', whenMinVersion: '4.2.0', thenEcuId: 'BCM', range: '>=3.1.0 <4' };
  const baseline = {
    targets: [
      { ecuId: 'FZC', version: '4.2.1' },
      { ecuId: 'BCM', version: '3.2.0' },
      { ecuId: 'INV', version: '2.3.0' },
      { ecuId: 'CAM', version: 'CAM_SW_0412' },
    ],
    rules: [rule],
  };
  const statusOf = (installed: Record<string, string | null>) =>
    Object.fromEntries(conformance(installed, baseline).ecus.map((e) => [e.ecuId, e.status]));

  it('when every ECU is at its target, then each is on-baseline and all count for readiness', () => {
    const result = conformance({ FZC: '4.2.1', BCM: '3.2.0', INV: '2.3.0', CAM: 'CAM_SW_0412' }, baseline);
    expect(result.ecus.map((e) => e.status)).toEqual(['on-baseline', 'on-baseline', 'on-baseline', 'on-baseline']);
    expect(result).toMatchObject({ expected: 4, onBaseline: 4 });
    expect(result.rules[0].state).toBe('holds');
  });

  it('when ECUs are behind, ahead, missing and not comparable, then each gets its status', () => {
    expect(statusOf({ FZC: '4.1.3', BCM: '3.3.0', CAM: 'CAM_SW_0398' })).toEqual({
      FZC: 'behind',
      BCM: 'ahead',
      INV: 'missing',
      CAM: 'not-comparable',
    });
  });

  it('when FZC is at 4.2.1 and BCM at 3.0.4, then BCM is rule-broken with the rule and both versions, and FZC stays on-baseline', () => {
    const result = conformance({ FZC: '4.2.1', BCM: '3.0.4', INV: '2.3.0', CAM: 'CAM_SW_0412' }, baseline);
    const bcm = result.ecus.find((e) => e.ecuId === 'BCM')!;
    expect(bcm.status).toBe('rule-broken');
    expect(bcm.rulesBroken).toEqual([{ rule, state: 'broken', whenInstalled: '4.2.1', thenInstalled: '3.0.4' }]);
    expect(result.ecus.find((e) => e.ecuId === 'FZC')!.status).toBe('on-baseline');
    expect(result.onBaseline).toBe(3);
  });

  it('when FZC is ahead (4.2.2) and breaks the rule, then it does not count as on the baseline; ahead without a broken rule does', () => {
    const broken = conformance({ FZC: '4.2.2', BCM: '4.0.0', INV: '2.3.0', CAM: 'CAM_SW_0412' }, baseline);
    expect(broken.ecus.find((e) => e.ecuId === 'FZC')).toMatchObject({ status: 'ahead', countsAsOnBaseline: false });
    expect(broken.ecus.find((e) => e.ecuId === 'BCM')).toMatchObject({ status: 'rule-broken', countsAsOnBaseline: false });
    expect(broken.onBaseline).toBe(2);
    const fine = conformance({ FZC: '4.2.2', BCM: '3.2.0', INV: '2.4.0', CAM: 'CAM_SW_0412' }, baseline);
    expect(fine.ecus.filter((e) => e.status === 'ahead').map((e) => e.countsAsOnBaseline)).toEqual([true, true]);
    expect(fine.onBaseline).toBe(4);
  });

  it('when FZC is below the rule threshold, then the rule is not triggered whatever BCM is', () => {
    const result = conformance({ FZC: '4.1.9', BCM: '2.0.0' }, baseline);
    expect(result.rules[0].state).toBe('not-triggered');
    expect(statusOf({ FZC: '4.1.9', BCM: '2.0.0' }).BCM).toBe('behind');
  });

  it('when BCM is not semver or not recorded while the rule applies, then the rule cannot be checked and BCM keeps its own status', () => {
    expect(conformance({ FZC: '4.2.1', BCM: 'B07_RC2' }, baseline).rules[0].state).toBe('cannot-check');
    expect(statusOf({ FZC: '4.2.1', BCM: 'B07_RC2' }).BCM).toBe('not-comparable');
    expect(conformance({ FZC: '4.2.1' }, baseline).rules[0].state).toBe('cannot-check');
    expect(statusOf({ FZC: '4.2.1' }).BCM).toBe('missing');
  });

  it('when an ECU is installed but not in the baseline, then it is listed with no target and no status, and does not count', () => {
    const result = conformance({ FZC: '4.2.1', XTRA: '1.0.0' }, baseline);
    expect(result.ecus.find((e) => e.ecuId === 'XTRA')).toMatchObject({ target: null, status: null, countsAsOnBaseline: false });
    expect(result.expected).toBe(4);
  });

  it('when there is no baseline, then nothing is expected', () => {
    expect(conformance({ FZC: '4.2.1' }, null)).toMatchObject({ expected: 0, onBaseline: 0, rules: [] });
  });
});

describe('target changes between two baselines', () => {
  it.each([
    [null, '1.0.0', 'added'],
    ['1.0.0', null, 'removed'],
    ['1.0.0', '1.1.0', 'upgraded'],
    ['1.1.0', '1.1.0-rc.1', 'downgraded'],
    ['ACM_SW_0398', 'ACM_SW_0412', 'changed'],
    ['1.0.0+a', '1.0.0+b', 'same'],
  ] as const)('when a target goes from %s to %s, then it is %s', (from, to, change) => {
    expect(targetChange(from, to)).toBe(change);
  });
});

describe('input schemas', () => {
  it('when a version has 65 characters, then it is refused; 64 are accepted', () => {
    expect(SoftwareVersionSchema.safeParse('1'.repeat(65)).success).toBe(false);
    expect(SoftwareVersionSchema.safeParse(`1.0.0-${'a'.repeat(58)}`).success).toBe(true);
  });

  it('when a rule threshold is not semver, then the schema refuses it and says why', () => {
    const parsed = RuleInputSchema.safeParse({ whenEcuId: crypto.randomUUID(), whenMinVersion: 'v4.2.0', thenEcuId: crypto.randomUUID(), range: '>=3.1.0 <4' });
    expect(parsed.success).toBe(false);
    expect(parsed.error!.issues[0].message).toMatch(/drop the leading "v"/);
  });

  it('when the calculator gets an empty range, then it is treated as no range', () => {
    expect(VersionCompareQuerySchema.parse({ installed: '1.0.0', target: '1.0.0', range: '' }).range).toBeUndefined();
  });
});
