import { DataTypes, Model, type Sequelize } from 'sequelize';

/** Browser sessions, stored in MariaDB through connect-session-sequelize. */
export class SessionModel extends Model {
  static initModel(sequelize: Sequelize) {
    SessionModel.init(
      {
        sid: { type: DataTypes.STRING(64), primaryKey: true },
        expires: { type: DataTypes.DATE, allowNull: true },
        data: { type: DataTypes.TEXT, allowNull: true },
      },
      { sequelize, modelName: 'Session', tableName: 'sessions', underscored: true },
    );
  }
}
