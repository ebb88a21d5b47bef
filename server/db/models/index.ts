import { DataTypes, Model, Sequelize, type CreationOptional, type InferAttributes, type InferCreationAttributes } from 'sequelize';
import type { Role } from '../../../shared/schemas/auth';

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
  return { Program, User, ProgramMember, AuthLink, OutboxMessage, HistoryEntry };
}
