import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { AllocationStatus, CampaignKindValue } from '../../../shared/schemas/validation';

export class ValidationTest extends Model<InferAttributes<ValidationTest>, InferCreationAttributes<ValidationTest>> {
  declare id: CreationOptional<string>;
  declare programId: string;
  declare stageId: string;
  declare name: string;
  declare procedureRef: string;
  declare verifies: string;
  declare reliability: number;
  declare confidence: number;
  declare testToLife: number | null;
  declare shape: number | null;
  declare requiredSamples: number;
  declare createdBy: string | null;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class TestAllocation extends Model<InferAttributes<TestAllocation>, InferCreationAttributes<TestAllocation>> {
  declare id: CreationOptional<string>;
  declare programId: string;
  declare testId: string;
  declare assetId: string;
  declare status: CreationOptional<AllocationStatus>;
  declare resultNotes: CreationOptional<string>;
  declare findingId: CreationOptional<string | null>;
  declare updatedBy: string | null;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class Campaign extends Model<InferAttributes<Campaign>, InferCreationAttributes<Campaign>> {
  declare id: CreationOptional<string>;
  declare programId: string;
  declare assetId: string;
  declare name: string;
  declare kind: CampaignKindValue;
  declare startedAt: Date | null;
  declare createdBy: string | null;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export class CampaignStep extends Model<InferAttributes<CampaignStep>, InferCreationAttributes<CampaignStep>> {
  declare id: CreationOptional<string>;
  declare campaignId: string;
  declare position: number;
  declare name: string;
  declare durationHours: number | null;
  declare distanceKm: number | null;
  declare temperatureC: number | null;
  declare humidityPct: number | null;
  declare route: string | null;
  declare doneHours: CreationOptional<number>;
  declare doneKm: CreationOptional<number>;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

/** Validation tests, allocations and campaigns (migration 20261202-0006); called by initModels. */
export function initValidationModels(sequelize: Sequelize) {
  // Sequelize writes into each attribute definition: every attribute gets its own object.
  const id = () => ({ type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 });
  const fk = (allowNull = false) => ({ type: DataTypes.UUID, allowNull });
  const str = (n: number) => ({ type: DataTypes.STRING(n), allowNull: false });
  const num = (allowNull: boolean) => ({ type: DataTypes.DOUBLE, allowNull });
  const version = () => ({ type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 });
  ValidationTest.init(
    {
      id: id(),
      programId: fk(),
      stageId: fk(),
      name: str(160),
      procedureRef: { ...str(120), defaultValue: '' },
      verifies: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
      reliability: num(false),
      confidence: num(false),
      testToLife: num(true),
      shape: num(true),
      requiredSamples: { type: DataTypes.INTEGER, allowNull: false },
      createdBy: fk(true),
      version: version(),
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'validation_tests', version: true },
  );
  TestAllocation.init(
    {
      id: id(),
      programId: fk(),
      testId: fk(),
      assetId: fk(),
      status: { type: DataTypes.STRING, allowNull: false, defaultValue: 'planned' },
      resultNotes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
      findingId: fk(true),
      updatedBy: fk(true),
      version: version(),
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'test_allocations', version: true },
  );
  Campaign.init(
    {
      id: id(),
      programId: fk(),
      assetId: fk(),
      name: str(160),
      kind: { type: DataTypes.STRING, allowNull: false },
      startedAt: { type: DataTypes.DATE, allowNull: true },
      createdBy: fk(true),
      version: version(),
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'campaigns', version: true },
  );
  CampaignStep.init(
    {
      id: id(),
      campaignId: fk(),
      position: { type: DataTypes.INTEGER, allowNull: false },
      name: str(120),
      durationHours: num(true),
      distanceKm: num(true),
      temperatureC: num(true),
      humidityPct: num(true),
      route: { type: DataTypes.STRING(120), allowNull: true },
      doneHours: { ...num(false), defaultValue: 0 },
      doneKm: { ...num(false), defaultValue: 0 },
      version: version(),
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'campaign_steps', version: true },
  );
  return { ValidationTest, TestAllocation, Campaign, CampaignStep };
}
