export { loadJobAndPart as load } from '../job-and-part';
