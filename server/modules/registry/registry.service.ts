import type { Sequelize } from 'sequelize';
import type { CohortFilter, CohortPage, CohortPlots, SavedSearch, SavedSearchInput } from '@/schemas/registry';
import type { User } from '@/schemas/user';
import { writeTransaction } from '../../db/write-transaction';
import { AppError, notFound } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import { cohortPlots, findCohort } from './cohort.repository';
import * as saved from './saved-searches.repository';

/** The filter's criteria without its paging and order. */
function criteriaOf(f: CohortFilter) {
  const { page: _page, pageSize: _pageSize, sort: _sort, dir: _dir, ...criteria } = f;
  return criteria;
}

export const searchCohort = (f: CohortFilter): Promise<CohortPage> =>
  findCohort(criteriaOf(f), { page: f.page, pageSize: f.pageSize, sort: f.sort, dir: f.dir });

export const plotCohort = (f: CohortFilter): Promise<CohortPlots> => cohortPlots(criteriaOf(f));

export const listSavedSearchesOf = (user: User): Promise<SavedSearch[]> => saved.listSavedSearches(user.id);

export async function saveSearch(sequelize: Sequelize, user: User, input: SavedSearchInput): Promise<SavedSearch> {
  return writeTransaction(sequelize, async (t) => {
    if (await saved.findSavedSearchByName(user.id, input.name, t)) {
      throw new AppError('CONFLICT', 'You already have a saved search with this name', {
        fields: { name: 'You already have a saved search with this name; choose another' },
      });
    }
    const search = await saved.insertSavedSearch(user.id, input.name, input.filters, t);
    await recordAudit(user, { action: 'create', entity: 'saved-search', entityId: search.id, after: { name: search.name, filters: search.filters } }, t);
    return search;
  });
}

export async function deleteSearch(sequelize: Sequelize, user: User, id: number): Promise<void> {
  await writeTransaction(sequelize, async (t) => {
    const gone = await saved.deleteSavedSearch(user.id, id, t);
    if (!gone) throw notFound('Saved search', id);
    await recordAudit(user, { action: 'delete', entity: 'saved-search', entityId: id, before: { name: gone.name, filters: gone.filters } }, t);
  });
}
