/** Plain-words names for model settings (shared with the study report: src-shared/report/settingsWords.ts). */
export { CENTERING_SHORT, CENTERING_WORDS, describeSettings } from '../../src-shared/report/settingsWords';
