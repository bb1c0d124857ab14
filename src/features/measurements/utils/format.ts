/** The bench screens' number and location formatting lives with the shared plate components. */
export { fmt, located } from '@/utils/format';
