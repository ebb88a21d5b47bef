import { DataTypes, Model, Sequelize, type CreationOptional, type InferAttributes, type InferCreationAttributes } from 'sequelize';
import type { Role } from '../../../shared/schemas/auth';
import type { AssetKind, AssetStatus, GateSettings, ItemState, System } from '../../../shared/schemas/assets';
import type { FindingSeverity, FindingStatus } from '../../../shared/schemas/findings';
import { initFindingModels } from './findings';
import { initValidationModels } from './validation';
import { initSoftwareModels } from './software';

export { FindingComment, FindingWatcher } from './findings';
export { Campaign, CampaignStep, TestAllocation, ValidationTest } from './validation';
export { Baseline, BaselineRule, BaselineTarget, Ecu } from './software';

export class Program extends Model<InferAttributes<Program>, InferCreationAttributes<Program>> {
  declare id: CreationOptional<string>;
  declare code: string;
  declare name: string;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<string>;
  declare email: string;
  declare name: string;
  declare role: Role;
  declare passwordHash: string | null;
  declare active: CreationOptional<boolean>;
  declare tokenVersion: CreationOptional<number>;
  declare emailPrefs: CreationOptional<Record<string, boolean>>;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class ProgramMember extends Model<InferAttributes<ProgramMember>, InferCreationAttributes<ProgramMember>> {
  declare programId: string;
  declare userId: string;
  declare createdAt: CreationOptional<Date>;
}

export class AuthLink extends Model<InferAttributes<AuthLink>, InferCreationAttributes<AuthLink>> {
  declare id: CreationOptional<string>;
  declare userId: string;
  declare purpose: 'invite' | 'reset';
  declare tokenHash: string;
  declare expiresAt: Date;
  declare usedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
}

export class OutboxMessage extends Model<InferAttributes<OutboxMessage>, InferCreationAttributes<OutboxMessage>> {
  declare id: CreationOptional<string>;
  declare toAddress: string;
  declare subject: string;
  declare text: string;
  declare kind: string;
  declare status: CreationOptional<'pending' | 'sent' | 'failed'>;
  declare attempts: CreationOptional<number>;
  declare nextAttemptAt: CreationOptional<Date>;
  declare lastError: CreationOptional<string | null>;
  declare sentAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
}

export class HistoryEntry extends Model<InferAttributes<HistoryEntry>, InferCreationAttributes<HistoryEntry>> {
  declare id: CreationOptional<number>;
  declare programId: string | null;
  declare entityType: string;
  declare entityId: string;
  declare action: string;
  declare actorId: string | null;
  declare at: CreationOptional<Date>;
  declare before: object | null;
  declare after: object | null;
  declare note: CreationOptional<string | null>;
}

export class Stage extends Model<InferAttributes<Stage>, InferCreationAttributes<Stage>> {
  declare id: CreationOptional<string>;
  declare programId: string;
  declare name: string;
  declare position: number;
  declare retired: CreationOptional<boolean>;
  declare gate: GateSettings;
  declare minDriverLevel: number;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class TemplateItem extends Model<InferAttributes<TemplateItem>, InferCreationAttributes<TemplateItem>> {
  declare id: CreationOptional<string>;
  declare programId: string;
  declare stageId: string;
  declare system: System;
  declare title: string;
  declare instructions: string;
  declare expectedPartNumber: string;
  declare expectedRevision: string;
  declare requiredForGate: boolean;
  declare hvQualified: boolean;
  declare position: number;
  declare retired: CreationOptional<boolean>;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class Asset extends Model<InferAttributes<Asset>, InferCreationAttributes<Asset>> {
  declare id: CreationOptional<string>;
  declare programId: string;
  declare tag: string;
  declare kind: AssetKind;
  declare stageId: string;
  declare status: AssetStatus;
  declare location: string;
  declare vin: string | null;
  declare odometerKm: number;
  declare buildDate: string | null;
  declare notes: string;
  declare createdBy: string | null;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class StageVisit extends Model<InferAttributes<StageVisit>, InferCreationAttributes<StageVisit>> {
  declare id: CreationOptional<string>;
  declare programId: string;
  declare assetId: string;
  declare stageId: string;
  declare enteredAt: CreationOptional<Date>;
  declare leftAt: CreationOptional<Date | null>;
  declare enteredBy: string | null;
}

export class ChecklistItem extends Model<InferAttributes<ChecklistItem>, InferCreationAttributes<ChecklistItem>> {
  declare id: CreationOptional<string>;
  declare programId: string;
  declare assetId: string;
  declare visitId: string;
  declare stageId: string;
  declare templateItemId: string | null;
  declare system: System;
  declare title: string;
  declare instructions: string;
  declare expectedPartNumber: string;
  declare expectedRevision: string;
  declare requiredForGate: boolean;
  declare hvQualified: boolean;
  declare position: number;
  declare state: CreationOptional<ItemState>;
  declare fittedPartNumber: CreationOptional<string>;
  declare fittedRevision: CreationOptional<string>;
  declare notes: CreationOptional<string>;
  declare naReason: CreationOptional<string>;
  declare findingId: CreationOptional<string | null>;
  declare updatedBy: CreationOptional<string | null>;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class Finding extends Model<InferAttributes<Finding>, InferCreationAttributes<Finding>> {
  declare id: CreationOptional<string>;
  declare programId: string;
  declare assetId: string | null;
  declare checklistItemId: string | null;
  declare title: string;
  declare description: string;
  declare system: System | null;
  declare severity: FindingSeverity;
  declare status: CreationOptional<FindingStatus>;
  declare ownerId: CreationOptional<string | null>;
  declare dueDate: CreationOptional<string | null>;
  declare rejectReason: CreationOptional<string | null>;
  declare idempotencyKey: CreationOptional<string | null>;
  declare createdBy: string | null;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class Photo extends Model<InferAttributes<Photo>, InferCreationAttributes<Photo>> {
  declare id: string;
  declare programId: string;
  declare assetId: string;
  declare checklistItemId: string | null;
  declare findingId: string | null;
  declare contentType: string;
  declare bytes: number;
  declare width: number | null;
  declare height: number | null;
  declare s3Key: string;
  declare thumbKey: string;
  declare sha256: string;
  declare idempotencyKey: string | null;
  declare createdBy: string | null;
  declare createdAt: CreationOptional<Date>;
}

const versioned = { version: true as const };

export function initModels(sequelize: Sequelize) {
  const id = { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 };
  Program.init(
    {
      id,
      code: { type: DataTypes.STRING(12), allowNull: false },
      name: { type: DataTypes.STRING(120), allowNull: false },
      version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'programs', ...versioned },
  );
  User.init(
    {
      id,
      email: { type: DataTypes.STRING(254), allowNull: false },
      name: { type: DataTypes.STRING(120), allowNull: false },
      role: { type: DataTypes.STRING, allowNull: false },
      passwordHash: { type: DataTypes.STRING(100), allowNull: true },
      active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
      tokenVersion: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      emailPrefs: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
      version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'users', ...versioned },
  );
  ProgramMember.init(
    {
      programId: { type: DataTypes.UUID, primaryKey: true },
      userId: { type: DataTypes.UUID, primaryKey: true },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'program_members', updatedAt: false },
  );
  AuthLink.init(
    {
      id,
      userId: { type: DataTypes.UUID, allowNull: false },
      purpose: { type: DataTypes.STRING, allowNull: false },
      tokenHash: { type: DataTypes.STRING(64), allowNull: false },
      expiresAt: { type: DataTypes.DATE, allowNull: false },
      usedAt: { type: DataTypes.DATE, allowNull: true },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'auth_links', updatedAt: false },
  );
  OutboxMessage.init(
    {
      id,
      toAddress: { type: DataTypes.STRING(254), allowNull: false },
      subject: { type: DataTypes.STRING(300), allowNull: false },
      text: { type: DataTypes.TEXT, allowNull: false },
      kind: { type: DataTypes.STRING(40), allowNull: false },
      status: { type: DataTypes.STRING, allowNull: false, defaultValue: 'pending' },
      attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      nextAttemptAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      lastError: { type: DataTypes.TEXT, allowNull: true },
      sentAt: { type: DataTypes.DATE, allowNull: true },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'outbox_messages', updatedAt: false },
  );
  HistoryEntry.init(
    {
      id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
      programId: { type: DataTypes.UUID, allowNull: true },
      entityType: { type: DataTypes.STRING(40), allowNull: false },
      entityId: { type: DataTypes.STRING(64), allowNull: false },
      action: { type: DataTypes.STRING(40), allowNull: false },
      actorId: { type: DataTypes.UUID, allowNull: true },
      at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      before: { type: DataTypes.JSONB, allowNull: true },
      after: { type: DataTypes.JSONB, allowNull: true },
      note: { type: DataTypes.TEXT, allowNull: true },
    },
    { sequelize, tableName: 'history_entries', timestamps: false },
  );
  const str = (n?: number) => ({ type: n ? DataTypes.STRING(n) : DataTypes.STRING, allowNull: false });
  // Sequelize writes into each attribute definition (its column name): every attribute gets its own object.
  const text = () => ({ type: DataTypes.TEXT, allowNull: false, defaultValue: '' });
  const bool = (defaultValue: boolean) => ({ type: DataTypes.BOOLEAN, allowNull: false, defaultValue });
  const fk = (allowNull = false) => ({ type: DataTypes.UUID, allowNull });
  const version = () => ({ type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 });
  Stage.init(
    {
      id,
      programId: fk(),
      name: str(60),
      position: { type: DataTypes.INTEGER, allowNull: false },
      retired: bool(false),
      gate: { type: DataTypes.JSONB, allowNull: false },
      minDriverLevel: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      version: version(),
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'stages', ...versioned },
  );
  TemplateItem.init(
    {
      id,
      programId: fk(),
      stageId: fk(),
      system: str(),
      title: str(160),
      instructions: text(),
      expectedPartNumber: { ...str(60), defaultValue: '' },
      expectedRevision: { ...str(20), defaultValue: '' },
      requiredForGate: bool(true),
      hvQualified: bool(false),
      position: { type: DataTypes.INTEGER, allowNull: false },
      retired: bool(false),
      version: version(),
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'template_items', ...versioned },
  );
  Asset.init(
    {
      id,
      programId: fk(),
      tag: str(32),
      kind: str(),
      stageId: fk(),
      status: str(),
      location: { ...str(80), defaultValue: '' },
      vin: { type: DataTypes.STRING(17), allowNull: true },
      odometerKm: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
      buildDate: { type: DataTypes.DATEONLY, allowNull: true },
      notes: text(),
      createdBy: fk(true),
      version: version(),
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'assets', ...versioned },
  );
  StageVisit.init(
    {
      id,
      programId: fk(),
      assetId: fk(),
      stageId: fk(),
      enteredAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
      leftAt: { type: DataTypes.DATE, allowNull: true },
      enteredBy: fk(true),
    },
    { sequelize, tableName: 'stage_visits', timestamps: false },
  );
  ChecklistItem.init(
    {
      id,
      programId: fk(),
      assetId: fk(),
      visitId: fk(),
      stageId: fk(),
      templateItemId: fk(true),
      system: str(),
      title: str(160),
      instructions: text(),
      expectedPartNumber: { ...str(60), defaultValue: '' },
      expectedRevision: { ...str(20), defaultValue: '' },
      requiredForGate: bool(true),
      hvQualified: bool(false),
      position: { type: DataTypes.INTEGER, allowNull: false },
      state: { ...str(), defaultValue: 'open' },
      fittedPartNumber: { ...str(60), defaultValue: '' },
      fittedRevision: { ...str(20), defaultValue: '' },
      notes: text(),
      naReason: { ...str(500), defaultValue: '' },
      findingId: fk(true),
      updatedBy: fk(true),
      version: version(),
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'checklist_items', ...versioned },
  );
  Finding.init(
    {
      id,
      programId: fk(),
      assetId: fk(true),
      checklistItemId: fk(true),
      title: str(160),
      description: text(),
      system: { type: DataTypes.STRING, allowNull: true },
      severity: { ...str(), defaultValue: 'major' },
      status: { ...str(), defaultValue: 'open' },
      ownerId: fk(true),
      dueDate: { type: DataTypes.DATEONLY, allowNull: true },
      rejectReason: { type: DataTypes.STRING(500), allowNull: true },
      idempotencyKey: { type: DataTypes.STRING(100), allowNull: true },
      createdBy: fk(true),
      version: version(),
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'findings', ...versioned },
  );
  Photo.init(
    {
      id: { type: DataTypes.UUID, primaryKey: true },
      programId: fk(),
      assetId: fk(),
      checklistItemId: fk(true),
      findingId: fk(true),
      contentType: str(40),
      bytes: { type: DataTypes.INTEGER, allowNull: false },
      width: { type: DataTypes.INTEGER, allowNull: true },
      height: { type: DataTypes.INTEGER, allowNull: true },
      s3Key: str(300),
      thumbKey: str(300),
      sha256: str(64),
      idempotencyKey: { type: DataTypes.STRING(100), allowNull: true },
      createdBy: fk(true),
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'photos', updatedAt: false },
  );
  initFindingModels(sequelize);
  initValidationModels(sequelize);
  initSoftwareModels(sequelize);
  return { Program, User, ProgramMember, AuthLink, OutboxMessage, HistoryEntry, Stage, TemplateItem, Asset, StageVisit, ChecklistItem, Finding, Photo };
}
