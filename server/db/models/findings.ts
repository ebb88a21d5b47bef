import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class FindingWatcher extends Model<InferAttributes<FindingWatcher>, InferCreationAttributes<FindingWatcher>> {
  declare findingId: string;
  declare userId: string;
  declare createdAt: CreationOptional<Date>;
}

export class FindingComment extends Model<InferAttributes<FindingComment>, InferCreationAttributes<FindingComment>> {
  declare id: CreationOptional<string>;
  declare programId: string;
  declare findingId: string;
  declare authorId: string | null;
  declare body: string;
  declare idempotencyKey: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
}

/** Watchers and comments of findings (migration 20261202-0003); called by initModels. */
export function initFindingModels(sequelize: Sequelize) {
  FindingWatcher.init(
    {
      findingId: { type: DataTypes.UUID, primaryKey: true },
      userId: { type: DataTypes.UUID, primaryKey: true },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'finding_watchers', updatedAt: false },
  );
  FindingComment.init(
    {
      id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
      programId: { type: DataTypes.UUID, allowNull: false },
      findingId: { type: DataTypes.UUID, allowNull: false },
      authorId: { type: DataTypes.UUID, allowNull: true },
      body: { type: DataTypes.TEXT, allowNull: false },
      idempotencyKey: { type: DataTypes.STRING(100), allowNull: true },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'finding_comments', updatedAt: false },
  );
  return { FindingWatcher, FindingComment };
}
