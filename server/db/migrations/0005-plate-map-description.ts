import { DataTypes, type QueryInterface } from 'sequelize';

export const name = '0005-plate-map-description';

/** Saved plate maps carry a short description (what the layout is for), shown when choosing one. */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('plate_maps', 'description', { type: DataTypes.TEXT, allowNull: false, defaultValue: '' });
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeColumn('plate_maps', 'description');
}
