export { ResultLine } from '@/components/plate/result-line';
