import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { AuditDetail, AuditKind } from '../../../shared/schemas/audit';

/** One security event (see audit.service.ts). */
export class AuditEventModel extends Model<InferAttributes<AuditEventModel>, InferCreationAttributes<AuditEventModel>> {
  declare id: CreationOptional<number>;
  declare at: Date;
  declare kind: AuditKind;
  declare actorId: number | null;
  declare subjectUserId: number | null;
  declare projectId: number | null;
  declare address: string | null;
  declare detail: AuditDetail;

  static initModel(sequelize: Sequelize) {
    AuditEventModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        at: { type: DataTypes.DATE(3), allowNull: false },
        kind: { type: DataTypes.STRING(40), allowNull: false },
        actorId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        subjectUserId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        projectId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        address: { type: DataTypes.STRING(64), allowNull: true },
        detail: { type: DataTypes.JSON, allowNull: false },
      },
      { sequelize, modelName: 'AuditEvent', tableName: 'audit_events', underscored: true, timestamps: false },
    );
  }
}
