import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { UNITS_PREFERENCES, type UnitsPreference } from '../../shared/units';

/** A person who can sign in. Google-only users have no password hash; password-only users have no googleSub. */
export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<number>;
  /** Stored lower-cased and trimmed; unique. */
  declare email: string;
  /** `scrypt$N$r$p$salt$hash` (see server/auth/passwords.ts), or null for Google-only accounts. */
  declare passwordHash: string | null;
  /** Google's stable subject id (`sub`), unique when present. */
  declare googleSub: string | null;
  declare displayName: string;
  /** Display units of this user: `club` follows each club's setting; `metric` or `imperial` overrides it. */
  declare unitsPreference: CreationOptional<UnitsPreference>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initUser(sequelize: Sequelize): typeof User {
  User.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      email: { type: DataTypes.STRING(254), allowNull: false, unique: true, validate: { isEmail: true } },
      passwordHash: { type: DataTypes.STRING(255), allowNull: true },
      googleSub: { type: DataTypes.STRING(255), allowNull: true, unique: true },
      displayName: { type: DataTypes.STRING(80), allowNull: false },
      unitsPreference: {
        type: DataTypes.STRING(10),
        allowNull: false,
        defaultValue: 'club',
        validate: { isIn: [UNITS_PREFERENCES as unknown as string[]] },
      },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'users', modelName: 'User' },
  );
  return User;
}
