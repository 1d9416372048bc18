import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

/** An entry of a club's action list (punt, long throw, ...). Flights store the key. */
export class FlightAction extends Model<InferAttributes<FlightAction>, InferCreationAttributes<FlightAction>> {
  declare id: CreationOptional<number>;
  declare clubId: number;
  declare key: string;
  declare label: string;
  declare archived: CreationOptional<boolean>;
  declare sortOrder: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initFlightAction(sequelize: Sequelize): typeof FlightAction {
  FlightAction.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      clubId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      key: { type: DataTypes.STRING(40), allowNull: false },
      label: { type: DataTypes.STRING(60), allowNull: false },
      archived: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      sortOrder: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'flight_actions', modelName: 'FlightAction' },
  );
  return FlightAction;
}
