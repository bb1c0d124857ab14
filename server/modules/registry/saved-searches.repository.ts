import type { Transaction } from 'sequelize';
import type { CohortCriteria, SavedSearch } from '@/schemas/registry';
import { SavedSearchModel } from './saved-search.model';

const toSaved = (row: SavedSearchModel): SavedSearch => ({
  id: row.id,
  name: row.name,
  filters: JSON.parse(row.filters) as CohortCriteria,
  createdAt: row.createdAt.toISOString(),
});

export async function listSavedSearches(userId: number): Promise<SavedSearch[]> {
  const rows = await SavedSearchModel.findAll({ where: { userId }, order: [['name', 'ASC'], ['id', 'ASC']] });
  return rows.map(toSaved);
}

export async function findSavedSearchByName(userId: number, name: string, transaction?: Transaction): Promise<SavedSearch | null> {
  const row = await SavedSearchModel.findOne({ where: { userId, name }, transaction });
  return row ? toSaved(row) : null;
}

export async function insertSavedSearch(userId: number, name: string, filters: CohortCriteria, transaction: Transaction): Promise<SavedSearch> {
  const row = await SavedSearchModel.create({ userId, name, filters: JSON.stringify(filters) }, { transaction });
  return toSaved(row);
}

/** Deletes one of the user's own searches; null when they have none with this id (another user's included). */
export async function deleteSavedSearch(userId: number, id: number, transaction: Transaction): Promise<SavedSearch | null> {
  const row = await SavedSearchModel.findOne({ where: { id, userId }, transaction });
  if (!row) return null;
  await row.destroy({ transaction });
  return toSaved(row);
}
