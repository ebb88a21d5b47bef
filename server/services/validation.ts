import crypto from 'node:crypto';
import { QueryTypes, UniqueConstraintError, type Sequelize, type Transaction } from 'sequelize';
import sharp from 'sharp';
import { z } from 'zod';
import { isClosedStatus } from '../../shared/domain/finding-workflow';
import { demonstratedReliability, sampleSizeProblems, successRunSampleSize } from '../../shared/domain/reliability';
import {
  type Allocation as AllocationDto,
  type AllocationStatus,
  type CreateAllocationSchema,
  type CreateValidationTestSchema,
  type TestStatus,
  type UpdateAllocationSchema,
  type UpdateValidationTestSchema,
  type ValidationTest as ValidationTestDto,
  type ValidationTestListQuerySchema,
} from '../../shared/schemas/validation';
import { Asset, Finding, Stage, TestAllocation, ValidationTest } from '../db/models';
import type { Deps } from '../deps';
import { AppError, conflict, fieldError, notFound } from '../lib/app-error';
import type { SessionUser } from '../middleware/auth';
import { recordHistory } from './history';
import { makeThumbnail, probeImage, signedPhotoUrl } from './photos';
import { assertMember, visibleStage } from './stages';

type ListQuery = z.output<typeof ValidationTestListQuerySchema>;
type CreateTest = z.output<typeof CreateValidationTestSchema>;
type UpdateTest = z.output<typeof UpdateValidationTestSchema>;
type CreateAllocation = z.output<typeof CreateAllocationSchema>;
type UpdateAllocation = z.output<typeof UpdateAllocationSchema>;

/** A failed result opens a finding of this severity: it stops a test or the gate (PRODUCT.md section 3C). */
export const FAILED_TEST_SEVERITY = 'blocking' as const;

// ---- Reading ------------------------------------------------------------------------------

type TestRow = {
  id: string;
  program_id: string;
  stage_id: string;
  stage: string;
  name: string;
  procedure_ref: string;
  verifies: string;
  reliability: number;
  confidence: number;
  test_to_life: number | null;
  shape: number | null;
  version: number;
};

type AllocationRow = {
  id: string;
  test_id: string;
  asset_id: string;
  asset_tag: string;
  status: AllocationStatus;
  result_notes: string;
  finding_id: string | null;
  updated_at: Date;
  version: number;
  report_id: string | null;
  report_content_type: string | null;
};

async function allocationRows(deps: Deps, where: { testIds?: string[]; ids?: string[] }, transaction?: Transaction) {
  const byTest = where.testIds !== undefined;
  return deps.sequelize.query<AllocationRow>(
    `SELECT ta.id, ta.test_id, ta.asset_id, a.tag AS asset_tag, ta.status, ta.result_notes, ta.finding_id, ta.updated_at, ta.version,
            r.id AS report_id, r.content_type AS report_content_type
       FROM test_allocations ta
       JOIN assets a ON a.id = ta.asset_id
       LEFT JOIN LATERAL (
         SELECT p.id, p.content_type FROM photos p WHERE p.allocation_id = ta.id ORDER BY p.created_at DESC, p.id DESC LIMIT 1
       ) r ON true
      WHERE ${byTest ? 'ta.test_id' : 'ta.id'} = ANY($1::uuid[])
      ORDER BY a.tag, ta.id`,
    { bind: [byTest ? where.testIds : where.ids], type: QueryTypes.SELECT, transaction },
  );
}

function toAllocationDto(deps: Deps, r: AllocationRow): AllocationDto {
  return {
    id: r.id,
    testId: r.test_id,
    assetId: r.asset_id,
    assetTag: r.asset_tag,
    status: r.status,
    resultNotes: r.result_notes,
    reportPhotoId: r.report_id,
    reportUrl: r.report_id ? signedPhotoUrl(deps, r.report_id, 'original') : null,
    reportContentType: r.report_content_type,
    findingId: r.finding_id,
    updatedAt: r.updated_at.toISOString(),
    version: r.version,
  };
}

/** The test's status from its allocations (see TEST_STATUSES in shared/schemas/validation). */
export function testStatus(statuses: readonly AllocationStatus[], requiredSamples: number): TestStatus {
  if (statuses.includes('failed')) return 'failed';
  const passed = statuses.filter((s) => s === 'passed').length;
  if (passed >= requiredSamples) return 'passed';
  if (passed > 0 || statuses.includes('running')) return 'running';
  return 'planned';
}

function toTestDto(deps: Deps, t: TestRow, allocations: AllocationRow[]): ValidationTestDto {
  const weibull = { testToLife: t.test_to_life, shape: t.shape };
  const size = successRunSampleSize({ reliability: t.reliability, confidence: t.confidence, ...weibull });
  const statuses = allocations.map((a) => a.status);
  const passed = statuses.filter((s) => s === 'passed').length;
  return {
    id: t.id,
    programId: t.program_id,
    stageId: t.stage_id,
    stage: t.stage,
    name: t.name,
    procedureRef: t.procedure_ref,
    verifies: t.verifies,
    reliability: t.reliability,
    confidence: t.confidence,
    testToLife: t.test_to_life,
    shape: t.shape,
    requiredSamples: size.n,
    requiredSamplesExact: size.exact,
    status: testStatus(statuses, size.n),
    passedSamples: passed,
    demonstratedReliability: passed > 0 && !statuses.includes('failed') ? demonstratedReliability(passed, t.confidence, weibull) : null,
    allocations: allocations.map((a) => toAllocationDto(deps, a)),
    version: t.version,
  };
}

async function selectTests(deps: Deps, where: string, bind: unknown[], transaction?: Transaction): Promise<ValidationTestDto[]> {
  const tests = await deps.sequelize.query<TestRow>(
    `SELECT t.id, t.program_id, t.stage_id, s.name AS stage, t.name, t.procedure_ref, t.verifies, t.reliability, t.confidence,
            t.test_to_life, t.shape, t.version
       FROM validation_tests t JOIN stages s ON s.id = t.stage_id
      WHERE ${where}
      ORDER BY s.position, lower(t.name), t.id`,
    { bind, type: QueryTypes.SELECT, transaction },
  );
  if (!tests.length) return [];
  const allocations = await allocationRows(deps, { testIds: tests.map((t) => t.id) }, transaction);
  const byTest = new Map<string, AllocationRow[]>();
  for (const a of allocations) byTest.set(a.test_id, [...(byTest.get(a.test_id) ?? []), a]);
  return tests.map((t) => toTestDto(deps, t, byTest.get(t.id) ?? []));
}

const testDto = async (deps: Deps, id: string, transaction?: Transaction) =>
  (await selectTests(deps, 't.id = $1', [id], transaction))[0];

async function allocationDto(deps: Deps, id: string, transaction?: Transaction): Promise<AllocationDto> {
  const [row] = await allocationRows(deps, { ids: [id] }, transaction);
  return toAllocationDto(deps, row);
}

/** The test when the user belongs to its program; otherwise 404, never 403. */
async function visibleTest(user: SessionUser, id: string, transaction?: Transaction, lock = false): Promise<ValidationTest> {
  const test = await ValidationTest.findByPk(id, { transaction, ...(lock && transaction ? { lock: transaction.LOCK.UPDATE } : {}) });
  if (!test || !user.programIds.includes(test.programId)) throw notFound('This validation test');
  return test;
}

async function visibleAllocation(user: SessionUser, id: string, transaction?: Transaction, lock = false): Promise<TestAllocation> {
  const allocation = await TestAllocation.findByPk(id, { transaction, ...(lock && transaction ? { lock: transaction.LOCK.UPDATE } : {}) });
  if (!allocation || !user.programIds.includes(allocation.programId)) throw notFound('This allocation');
  return allocation;
}

export async function listTests(deps: Deps, user: SessionUser, q: ListQuery): Promise<{ tests: ValidationTestDto[] }> {
  assertMember(user, q.programId, 'This program');
  if (q.stageId) {
    const stage = await Stage.findByPk(q.stageId);
    if (!stage || stage.programId !== q.programId) throw notFound('This stage');
    return { tests: await selectTests(deps, 't.program_id = $1 AND t.stage_id = $2', [q.programId, q.stageId]) };
  }
  return { tests: await selectTests(deps, 't.program_id = $1', [q.programId]) };
}

export async function getTest(deps: Deps, user: SessionUser, id: string): Promise<ValidationTestDto> {
  const test = await visibleTest(user, id);
  return testDto(deps, test.id);
}

// ---- Writing tests ------------------------------------------------------------------------

const nameTaken = () => fieldError('name', 'Another test of this stage has this name.', 'validation/test-name-taken', 409);

function editable(t: ValidationTest) {
  return {
    stageId: t.stageId,
    name: t.name,
    procedureRef: t.procedureRef,
    verifies: t.verifies,
    reliability: t.reliability,
    confidence: t.confidence,
    testToLife: t.testToLife,
    shape: t.shape,
    requiredSamples: t.requiredSamples,
  };
}

export async function createTest(deps: Deps, user: SessionUser, input: CreateTest): Promise<ValidationTestDto> {
  const stage = await visibleStage(user, input.stageId);
  const weibull = { testToLife: input.testToLife ?? null, shape: input.shape ?? null };
  const { n } = successRunSampleSize({ reliability: input.reliability, confidence: input.confidence, ...weibull });
  try {
    return await deps.sequelize.transaction(async (transaction) => {
      const test = await ValidationTest.create(
        {
          programId: stage.programId,
          stageId: stage.id,
          name: input.name,
          procedureRef: input.procedureRef,
          verifies: input.verifies,
          reliability: input.reliability,
          confidence: input.confidence,
          ...weibull,
          requiredSamples: n,
          createdBy: user.id,
        },
        { transaction },
      );
      await recordHistory(
        { programId: test.programId, entityType: 'validation-test', entityId: test.id, action: 'created', actorId: user.id, after: editable(test) },
        transaction,
      );
      return testDto(deps, test.id, transaction);
    });
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw nameTaken();
    throw err;
  }
}

/** Applies `{ version, ...changes }` under a row lock; R, C, L and b are checked as they will stand together. */
export async function updateTest(deps: Deps, user: SessionUser, id: string, input: UpdateTest): Promise<ValidationTestDto> {
  try {
    return await deps.sequelize.transaction(async (transaction) => {
      const test = await visibleTest(user, id, transaction, true);
      if (test.version !== input.version) throw conflict('Someone else changed this test first.', await testDto(deps, test.id, transaction));
      const before = editable(test);
      if (input.stageId !== undefined && input.stageId !== test.stageId) {
        const stage = await Stage.findByPk(input.stageId, { transaction });
        if (!stage || stage.programId !== test.programId) throw fieldError('stageId', 'Choose a stage of this program.');
        test.stageId = stage.id;
      }
      const merged = {
        reliability: input.reliability ?? test.reliability,
        confidence: input.confidence ?? test.confidence,
        testToLife: input.testToLife !== undefined ? input.testToLife : test.testToLife,
        shape: input.shape !== undefined ? input.shape : test.shape,
      };
      const problems = sampleSizeProblems(merged);
      if (problems.length) throw fieldError(problems[0].field, problems[0].message);
      if (input.name !== undefined) test.name = input.name;
      if (input.procedureRef !== undefined) test.procedureRef = input.procedureRef;
      if (input.verifies !== undefined) test.verifies = input.verifies;
      Object.assign(test, merged, { requiredSamples: successRunSampleSize(merged).n });
      const after = editable(test);
      const keys = (Object.keys(after) as Array<keyof typeof after>).filter((k) => before[k] !== after[k]);
      if (!keys.length) return testDto(deps, test.id, transaction);
      test.changed('updatedAt', true);
      await test.save({ transaction });
      await recordHistory(
        {
          programId: test.programId,
          entityType: 'validation-test',
          entityId: test.id,
          action: 'updated',
          actorId: user.id,
          before: Object.fromEntries(keys.map((k) => [k, before[k]])),
          after: Object.fromEntries(keys.map((k) => [k, after[k]])),
        },
        transaction,
      );
      return testDto(deps, test.id, transaction);
    });
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw nameTaken();
    throw err;
  }
}

// ---- Allocations --------------------------------------------------------------------------

/** Allocates an asset of the test's program to the test (once per asset); answers the whole test. */
export async function allocateAsset(deps: Deps, user: SessionUser, testId: string, input: CreateAllocation): Promise<ValidationTestDto> {
  try {
    return await deps.sequelize.transaction(async (transaction) => {
      const test = await visibleTest(user, testId, transaction);
      const asset = await Asset.findByPk(input.assetId, { transaction });
      if (!asset || asset.programId !== test.programId) throw fieldError('assetId', 'Choose an asset of this program.');
      const allocation = await TestAllocation.create(
        { programId: test.programId, testId: test.id, assetId: asset.id, updatedBy: user.id },
        { transaction },
      );
      await recordHistory(
        {
          programId: test.programId,
          entityType: 'test-allocation',
          entityId: allocation.id,
          action: 'created',
          actorId: user.id,
          after: { testId: test.id, test: test.name, assetId: asset.id, assetTag: asset.tag, status: allocation.status },
        },
        transaction,
      );
      return testDto(deps, test.id, transaction);
    });
  } catch (err) {
    if (err instanceof UniqueConstraintError) {
      throw fieldError('assetId', 'This asset is already allocated to this test.', 'validation/already-allocated', 409);
    }
    throw err;
  }
}

/**
 * Records a result. Entering `failed` opens a blocking finding on the asset and links it, unless
 * the link already points at a finding that is still open (a re-run that fails again).
 */
export async function updateAllocation(deps: Deps, user: SessionUser, id: string, input: UpdateAllocation): Promise<AllocationDto> {
  return deps.sequelize.transaction(async (transaction) => {
    const allocation = await visibleAllocation(user, id, transaction, true);
    if (allocation.version !== input.version) {
      throw conflict('Someone else changed this allocation first.', await allocationDto(deps, allocation.id, transaction));
    }
    const before = { status: allocation.status, resultNotes: allocation.resultNotes, findingId: allocation.findingId ?? null };
    if (input.status !== undefined) allocation.status = input.status;
    if (input.resultNotes !== undefined) allocation.resultNotes = input.resultNotes;
    if (allocation.status === before.status && allocation.resultNotes === before.resultNotes) return allocationDto(deps, allocation.id, transaction);

    if (allocation.status === 'failed' && before.status !== 'failed') {
      const linked = allocation.findingId ? await Finding.findByPk(allocation.findingId, { transaction }) : null;
      if (!linked || isClosedStatus(linked.status)) {
        const finding = await openFailureFinding(allocation, user, transaction);
        allocation.findingId = finding.id;
      }
    }
    allocation.updatedBy = user.id;
    allocation.changed('updatedAt', true);
    await allocation.save({ transaction });
    await recordHistory(
      {
        programId: allocation.programId,
        entityType: 'test-allocation',
        entityId: allocation.id,
        action: allocation.status !== before.status ? 'status-changed' : 'updated',
        actorId: user.id,
        before,
        after: { status: allocation.status, resultNotes: allocation.resultNotes, findingId: allocation.findingId ?? null },
      },
      transaction,
    );
    return allocationDto(deps, allocation.id, transaction);
  });
}

/**
 * The finding of a failed test, written in the caller's transaction. The findings service's
 * createFinding runs its own transaction, so this follows the checklist deviation's way
 * (server/services/checklists.ts): the row and its `created` history entry, no owner, no mail.
 */
async function openFailureFinding(allocation: TestAllocation, user: SessionUser, transaction: Transaction): Promise<Finding> {
  const test = (await ValidationTest.findByPk(allocation.testId, { transaction }))!;
  const asset = (await Asset.findByPk(allocation.assetId, { transaction }))!;
  const reference = test.procedureRef ? ` (${test.procedureRef})` : '';
  const finding = await Finding.create(
    {
      programId: allocation.programId,
      assetId: allocation.assetId,
      checklistItemId: null,
      title: `Failed validation test: ${test.name}`.slice(0, 160),
      description: (allocation.resultNotes || `The validation test "${test.name}"${reference} failed on ${asset.tag}.`).slice(0, 4000),
      system: null,
      severity: FAILED_TEST_SEVERITY,
      createdBy: user.id,
    },
    { transaction },
  );
  await recordHistory(
    {
      programId: finding.programId,
      entityType: 'finding',
      entityId: finding.id,
      action: 'created',
      actorId: user.id,
      after: {
        title: finding.title,
        description: finding.description,
        severity: finding.severity,
        status: finding.status,
        system: finding.system,
        assetId: finding.assetId,
        assetTag: asset.tag,
        validationTestId: test.id,
        allocationId: allocation.id,
      },
      note: 'Opened from a failed validation test.',
    },
    transaction,
  );
  return finding;
}

// ---- Reports ------------------------------------------------------------------------------

const unsupportedReport = () =>
  new AppError(415, 'upload/unsupported-type', 'A report must be a PDF or a picture (JPEG, PNG, WebP or HEIC).', {
    fields: { report: 'Not a PDF or a picture.' },
  });

type ProbedReport = { contentType: string; ext: string; width: number | null; height: number | null; image: Awaited<ReturnType<typeof probeImage>> | null };

/** The real type from the bytes (never the name or the declared type): a PDF by its `%PDF-` header, or a picture sharp can read. */
export async function probeReport(buffer: Buffer): Promise<ProbedReport> {
  if (buffer.length >= 5 && buffer.toString('latin1', 0, 5) === '%PDF-') {
    return { contentType: 'application/pdf', ext: 'pdf', width: null, height: null, image: null };
  }
  try {
    const image = await probeImage(buffer);
    return { contentType: image.contentType, ext: image.ext, width: image.width, height: image.height, image };
  } catch (err) {
    if (err instanceof AppError && err.status === 415) throw unsupportedReport();
    if (err instanceof AppError) throw new AppError(err.status, err.code, err.message, { fields: { report: 'Too many pixels.' } });
    throw err;
  }
}

/** A plain tile for a PDF: nothing renders PDF pages here, and the photo table wants a thumbnail. */
async function pdfThumbnail(): Promise<Buffer> {
  return sharp({ create: { width: 240, height: 320, channels: 3, background: '#e4e7ec' } }).jpeg({ quality: 78 }).toBuffer();
}

/**
 * Attaches a report to an allocation: stored like a photo (S3 object, thumbnail, a photos row with
 * allocation_id). The newest one is the allocation's report; earlier ones stay in the history.
 */
export async function uploadReport(deps: Deps, user: SessionUser, allocationId: string, file: { buffer: Buffer } | undefined): Promise<AllocationDto> {
  const allocation = await visibleAllocation(user, allocationId);
  if (!file?.buffer?.length) throw fieldError('report', 'Choose a PDF or a picture to upload.');
  const buffer = file.buffer;
  const probed = await probeReport(buffer);
  const thumb = probed.image ? await makeThumbnail(buffer, probed.image) : await pdfThumbnail();
  const sha256 = crypto.createHash('sha256').update(buffer).digest('hex');
  const id = crypto.randomUUID();
  const base = `programs/${allocation.programId}/assets/${allocation.assetId}/reports/${id}`;
  const s3Key = `${base}.${probed.ext}`;
  const thumbKey = `${base}-thumb.jpg`;
  await Promise.all([deps.storage.put(s3Key, buffer, probed.contentType), deps.storage.put(thumbKey, thumb, 'image/jpeg')]);
  try {
    return await deps.sequelize.transaction(async (transaction) => {
      const locked = await visibleAllocation(user, allocationId, transaction, true);
      await deps.sequelize.query(
        `INSERT INTO photos (id, program_id, asset_id, allocation_id, content_type, bytes, width, height, s3_key, thumb_key, sha256, created_by)
         VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11, $12)`,
        {
          bind: [id, locked.programId, locked.assetId, locked.id, probed.contentType, buffer.length, probed.width, probed.height, s3Key, thumbKey, sha256, user.id],
          transaction,
        },
      );
      locked.updatedBy = user.id;
      locked.changed('updatedAt', true);
      await locked.save({ transaction });
      await recordHistory(
        {
          programId: locked.programId,
          entityType: 'test-allocation',
          entityId: locked.id,
          action: 'report-attached',
          actorId: user.id,
          after: { reportPhotoId: id, contentType: probed.contentType, bytes: buffer.length, sha256 },
        },
        transaction,
      );
      return allocationDto(deps, locked.id, transaction);
    });
  } catch (err) {
    // Nothing half-saved: the objects go when the row does not come.
    await Promise.allSettled([deps.storage.delete(s3Key), deps.storage.delete(thumbKey)]);
    throw err;
  }
}

// ---- For readiness ------------------------------------------------------------------------

export type ValidationParts = {
  /** Tests the asset is allocated to. */
  allocated: number;
  passed: number;
  /** Allocations not (yet) passed, for the readiness breakdown. */
  notPassed: Array<{ testId: string; name: string; status: Exclude<AllocationStatus, 'passed'> }>;
};

/**
 * The validation part of readiness (PRODUCT.md section 4: V = allocated tests passed / allocated
 * tests, 1 when none) for the given assets, or for every asset of a program when given its id:
 * one set-based statement. Every asset asked for is in the map (an unknown id with zeros);
 * `notPassed` is ordered by test name.
 */
export async function validationPartsForAssets(
  sequelize: Sequelize,
  scope: readonly string[] | string,
  transaction?: Transaction,
): Promise<Map<string, ValidationParts>> {
  const byProgram = typeof scope === 'string';
  if (!byProgram && !scope.length) return new Map();
  const rows = await sequelize.query<{ asset_id: string; allocated: number; passed: number; not_passed: ValidationParts['notPassed'] }>(
    `SELECT s.id AS asset_id,
            count(ta.id)::int AS allocated,
            count(ta.id) FILTER (WHERE ta.status = 'passed')::int AS passed,
            coalesce(
              jsonb_agg(jsonb_build_object('testId', t.id, 'name', t.name, 'status', ta.status) ORDER BY lower(t.name), t.id)
                FILTER (WHERE ta.id IS NOT NULL AND ta.status <> 'passed'),
              '[]'::jsonb
            ) AS not_passed
       FROM ${byProgram ? 'assets s' : 'unnest($1::uuid[]) AS s(id)'}
       LEFT JOIN test_allocations ta ON ta.asset_id = s.id
       LEFT JOIN validation_tests t ON t.id = ta.test_id
      ${byProgram ? 'WHERE s.program_id = $1' : ''}
      GROUP BY s.id`,
    { bind: [byProgram ? scope : [...new Set(scope.map((id) => id.toLowerCase()))]], type: QueryTypes.SELECT, transaction },
  );
  return new Map(rows.map((r) => [r.asset_id, { allocated: r.allocated, passed: r.passed, notPassed: r.not_passed }]));
}
