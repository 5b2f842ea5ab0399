/** Plain-words names for model settings (shared with the study report: src-shared/report/settingsWords.ts). */
export { CENTERING_SHORT, describeSettings } from '../../src-shared/report/settingsWords';
