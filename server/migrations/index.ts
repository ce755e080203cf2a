/** Every migration, in order. New migrations are appended here as classes (no glob loading). */
import { Foundation1764650000000 } from './1764650000000-foundation';
import { CueLibrary1764660000000 } from './1764660000000-cue-library';
import { Sync1764670000000 } from './1764670000000-sync';
import { SyncTables1764700000000 } from './1764700000000-sync-tables';
import { TokenFamilies1764720000000 } from './1764720000000-token-families';
import { NoteAuthors1764730000000 } from './1764730000000-note-authors';
import { SquadManagement1764740000000 } from './1764740000000-squad-management';
import { Clock1764750000000 } from './1764750000000-clock';
import { Review1764760000000 } from './1764760000000-review';
import { NoteMoves1764771000000 } from './1764771000000-note-moves';
import { ReviewExport1764775000000 } from './1764775000000-review-export';
import { ReviewExportNotes1764776000000 } from './1764776000000-review-export-notes';
import { ReviewWeekCounts1764785000000 } from './1764785000000-review-week-counts';
import { ReviewGroupWeekCounts1764786000000 } from './1764786000000-review-group-week-counts';

export const migrations = [Foundation1764650000000, CueLibrary1764660000000, Sync1764670000000, SyncTables1764700000000, TokenFamilies1764720000000, NoteAuthors1764730000000, SquadManagement1764740000000, Clock1764750000000, Review1764760000000, NoteMoves1764771000000, ReviewExport1764775000000, ReviewExportNotes1764776000000, ReviewWeekCounts1764785000000, ReviewGroupWeekCounts1764786000000];
