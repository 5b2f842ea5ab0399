/** What every side-panel section may use: the page's shared objects. */
import type { HostBridge } from '../bridge/hostBridge';
import type { RatingGrid } from '../grid/ratingGrid';
import type { FitController } from '../runs/fitController';
import type { StudyRecord } from '../report/studyRecord';
import type { RunStore } from '../runs/runStore';
import type { DocumentStore } from '../state/documentStore';
import type { SettingsStore } from '../state/settingsStore';
import type { ViewStore } from '../state/viewStore';
import type { Notice } from './notice';
import type { SidePanel } from './sidePanel';

export interface PanelContext {
  bridge: HostBridge;
  store: DocumentStore;
  runs: RunStore;
  controller: FitController;
  grid: RatingGrid;
  notice: Notice;
  settings: SettingsStore;
  view: ViewStore;
  side: SidePanel;
  /** Results and exports the study report gathers (report/studyRecord.ts). */
  record: StudyRecord;
}
