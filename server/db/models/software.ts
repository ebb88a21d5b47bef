import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { AssetKind } from '../../../shared/schemas/assets';
import type { BaselineStatus } from '../../../shared/schemas/software';

export class Ecu extends Model<InferAttributes<Ecu>, InferCreationAttributes<Ecu>> {
  declare id: CreationOptional<string>;
  declare programId: string;
  declare name: string;
  declare code: string;
  declare supplier: string;
  declare assetKinds: AssetKind[];
  declare stageIds: string[];
  declare notes: string;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class Baseline extends Model<InferAttributes<Baseline>, InferCreationAttributes<Baseline>> {
  declare id: CreationOptional<string>;
  declare programId: string;
  declare stageId: string;
  declare name: string;
  declare releaseLabel: string;
  declare date: string;
  declare status: CreationOptional<BaselineStatus>;
  declare notes: string;
  declare releasedAt: CreationOptional<Date | null>;
  declare releasedBy: CreationOptional<string | null>;
  declare supersededAt: CreationOptional<Date | null>;
  declare supersededById: CreationOptional<string | null>;
  declare createdBy: string | null;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class BaselineTarget extends Model<InferAttributes<BaselineTarget>, InferCreationAttributes<BaselineTarget>> {
  declare baselineId: string;
  declare ecuId: string;
  declare version: string;
}

export class BaselineRule extends Model<InferAttributes<BaselineRule>, InferCreationAttributes<BaselineRule>> {
  declare id: CreationOptional<string>;
  declare baselineId: string;
  declare position: number;
  declare whenEcuId: string;
  declare whenMinVersion: string;
  declare thenEcuId: string;
  declare range: string;
  declare note: string;
}

/** ECU catalogue, baselines and their targets and rules (migration 20261202-0004); called by initModels. */
export function initSoftwareModels(sequelize: Sequelize) {
  // Sequelize writes into each attribute definition: every attribute gets its own object.
  const uuid = (allowNull = false) => ({ type: DataTypes.UUID, allowNull });
  const str = (n: number, defaultValue?: string) => ({ type: DataTypes.STRING(n), allowNull: false, ...(defaultValue !== undefined ? { defaultValue } : {}) });
  const version = () => ({ type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 });
  Ecu.init(
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      programId: uuid(),
      name: str(120),
      code: str(12),
      supplier: str(120, ''),
      assetKinds: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false, defaultValue: [] },
      stageIds: { type: DataTypes.ARRAY(DataTypes.UUID), allowNull: false, defaultValue: [] },
      notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
      version: version(),
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'ecus', version: true },
  );
  Baseline.init(
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      programId: uuid(),
      stageId: uuid(),
      name: str(120),
      releaseLabel: str(40, ''),
      date: { type: DataTypes.DATEONLY, allowNull: false },
      status: { type: DataTypes.STRING, allowNull: false, defaultValue: 'draft' },
      notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
      releasedAt: { type: DataTypes.DATE, allowNull: true },
      releasedBy: uuid(true),
      supersededAt: { type: DataTypes.DATE, allowNull: true },
      supersededById: uuid(true),
      createdBy: uuid(true),
      version: version(),
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'baselines', version: true },
  );
  BaselineTarget.init(
    {
      baselineId: { type: DataTypes.UUID, primaryKey: true },
      ecuId: { type: DataTypes.UUID, primaryKey: true },
      version: str(64),
    },
    { sequelize, tableName: 'baseline_targets', timestamps: false },
  );
  BaselineRule.init(
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      baselineId: uuid(),
      position: { type: DataTypes.INTEGER, allowNull: false },
      whenEcuId: uuid(),
      whenMinVersion: str(64),
      thenEcuId: uuid(),
      range: str(200),
      note: str(300, ''),
    },
    { sequelize, tableName: 'baseline_rules', timestamps: false },
  );
  return { Ecu, Baseline, BaselineTarget, BaselineRule };
}
