import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** A ball a club added beside the catalogue (SI: kg, m). Flights store `club:<id>`. */
export class ClubBall extends Model<InferAttributes<ClubBall>, InferCreationAttributes<ClubBall>> {
  declare id: CreationOptional<number>;
  declare clubId: number;
  declare name: string;
  declare massKg: number;
  declare diameterM: number;
  declare cdMin: number | null;
  declare cdMax: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initClubBall(sequelize: Sequelize): typeof ClubBall {
  ClubBall.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      clubId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      name: { type: DataTypes.STRING(60), allowNull: false },
      massKg: { type: DataTypes.DOUBLE, allowNull: false },
      diameterM: { type: DataTypes.DOUBLE, allowNull: false },
      cdMin: { type: DataTypes.DOUBLE, allowNull: true },
      cdMax: { type: DataTypes.DOUBLE, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'club_balls', modelName: 'ClubBall' },
  );
  return ClubBall;
}
