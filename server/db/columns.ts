import { DataTypes } from 'sequelize';

/** Column definitions every model shares (models only: migrations stay frozen copies of what they created). */
export const idColumn = { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true } as const;

/** The optimistic-locking counter: an update must name the version it read (see DEVELOPERS.md). */
export const editVersionColumn = { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 } as const;

export const timestampColumns = { createdAt: DataTypes.DATE, updatedAt: DataTypes.DATE } as const;
