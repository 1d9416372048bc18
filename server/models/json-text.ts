/**
 * JSON kept in TEXT columns, parsed and written by the model.
 * Note: MariaDB's JSON type is LONGTEXT underneath and the mariadb dialect hands it back as a string in some
 * query paths; plain TEXT with an explicit getter/setter behaves the same everywhere.
 */
import { DataTypes, type ModelAttributeColumnOptions, type Model } from 'sequelize';

export function jsonText<T>(field: string, options: { allowNull: boolean; long?: boolean }): ModelAttributeColumnOptions<Model> {
  return {
    type: options.long ? DataTypes.TEXT('long') : DataTypes.TEXT,
    allowNull: options.allowNull,
    get(this: Model) {
      const raw = this.getDataValue(field) as string | null | undefined;
      if (raw === null || raw === undefined) return null;
      return (typeof raw === 'string' ? JSON.parse(raw) : raw) as T;
    },
    set(this: Model, value: T | null) {
      this.setDataValue(field, value === null || value === undefined ? null : JSON.stringify(value));
    },
  };
}
