import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { AtomLibraryScope } from '../../../shared/schemas/atom-libraries';
import type { UserModel } from '../users/user.model';

/** An uploaded meta-atom library; `atoms` is the engine's MetaAtom[] (metres, radians) as JSON text. */
export class AtomLibraryModel extends Model<InferAttributes<AtomLibraryModel>, InferCreationAttributes<AtomLibraryModel>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare material: string;
  declare source: string | null;
  declare wavelengthNm: number;
  declare periodNm: number;
  declare heightNm: number;
  declare approximate: boolean;
  declare atomCount: number;
  declare atoms: string;
  declare scope: AtomLibraryScope;
  declare ownerId: number;
  /** The project of a 'project' library; null for a personal one. */
  declare projectId: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare owner?: NonAttribute<UserModel | null>;

  static initModel(sequelize: Sequelize) {
    AtomLibraryModel.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        name: { type: DataTypes.STRING(120), allowNull: false },
        material: { type: DataTypes.STRING(300), allowNull: false, defaultValue: '' },
        source: { type: DataTypes.STRING(500), allowNull: true },
        wavelengthNm: { type: DataTypes.DOUBLE, allowNull: false },
        periodNm: { type: DataTypes.DOUBLE, allowNull: false },
        heightNm: { type: DataTypes.DOUBLE, allowNull: false },
        approximate: { type: DataTypes.BOOLEAN, allowNull: false },
        atomCount: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        atoms: { type: DataTypes.TEXT('long'), allowNull: false },
        scope: { type: DataTypes.ENUM('personal', 'project'), allowNull: false },
        ownerId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        projectId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'AtomLibrary', tableName: 'atom_libraries', underscored: true },
    );
  }
}
