import { getLabProfile } from '../lab-profile/lab-profile.service';

/** The laboratory's IANA time zone; UTC until an admin has saved the profile. */
export async function labTimeZone(): Promise<string> {
  try {
    return (await getLabProfile()).timeZone;
  } catch {
    return 'UTC';
  }
}
