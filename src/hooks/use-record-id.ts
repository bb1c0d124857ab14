import { useParams } from 'react-router-dom';

/** The route's `:id` as a record id (a whole number from 1), or null when the address holds anything else. */
export function useRecordId(): number | null {
  const numeric = Number(useParams().id);
  return Number.isInteger(numeric) && numeric >= 1 ? numeric : null;
}
