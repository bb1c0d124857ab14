import { formatWhen } from '@/utils/format';

/** When a notice was queued or sent, as every date in Cristae reads (the laboratory's zone). */
export const when = (iso: string) => formatWhen(iso);
