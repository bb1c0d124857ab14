import { useQuery } from '@tanstack/react-query';
import { labProfileQueries } from '@/features/lab-profile/api/lab-profile';

/**
 * The laboratory's time zone from its profile (null while loading), for the case pages to show times in, and
 * the server's notice when the saved zone is not a real one and UTC is used instead.
 */
export function useLabTimeZone(): { timeZone: string | null; notice: string | null; error: Error | null } {
  const { data, error } = useQuery(labProfileQueries.profile());
  return { timeZone: data?.timeZone ?? (error ? 'UTC' : null), notice: data?.timeZoneNotice ?? null, error };
}
