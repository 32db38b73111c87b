import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { ROLES, type Role } from '../../../shared/schemas/roles.ts';
import { oneOf, optionalText, requiredText, timestampAttributes, useIsoTimestamps } from './helpers.ts';

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<number>;
  declare email: string;
  declare fullName: string;
  declare initials: string;
  declare role: Role;
  declare passwordHash: string;
  declare active: CreationOptional<boolean>;
  declare failedLoginCount: CreationOptional<number>;
  declare lockedAt: CreationOptional<string | null>;
  declare lastLoginAt: CreationOptional<string | null>;
  /** Set when an administrator chose the password (migration 0016): the person must choose their own first. */
  declare mustChangePassword: CreationOptional<boolean>;
  declare createdAt: CreationOptional<string>;
  declare updatedAt: CreationOptional<string>;
}

export function initUser(sequelize: Sequelize): typeof User {
  User.init(
    {
      id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
      email: {
        ...requiredText(),
        unique: true,
        set(this: User, value: string) {
          this.setDataValue('email', value.trim().toLowerCase());
        },
      },
      fullName: requiredText(),
      initials: requiredText(),
      role: oneOf(ROLES) as never,
      passwordHash: requiredText(),
      active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
      failedLoginCount: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      lockedAt: optionalText(),
      lastLoginAt: optionalText(),
      mustChangePassword: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      ...timestampAttributes(),
    },
    { sequelize, tableName: 'users', modelName: 'User', underscored: true, timestamps: false },
  );
  useIsoTimestamps(User as never);
  return User;
}
