import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** A personal atom library shared by its owner with one project. */
export class AtomLibraryShareModel extends Model<InferAttributes<AtomLibraryShareModel>, InferCreationAttributes<AtomLibraryShareModel>> {
  declare id: CreationOptional<number>;
  declare atomLibraryId: number;
  declare projectId: number;
  declare sharedById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    AtomLibraryShareModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        atomLibraryId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        projectId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        sharedById: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'AtomLibraryShare', tableName: 'atom_library_shares', underscored: true },
    );
  }
}
