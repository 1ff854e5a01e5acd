// The stopspan library: what a program needs to audit a feed, weigh a proposal, check or compare feeds and
// keep a run history, named one by one (test/index.test.ts lists them, so a new export is a decision).
// In pipeline order: errors and warnings, the reader and the patterns, the model's parameters, the audit,
// the products built on it, the reports. Everything else is internal and may change.

// errors, progress, warnings
export { StopspanError, isStopspanError, type ErrorCode, type ErrorContext } from './common/errors.js';
export type { ProgressEvent, OnProgress } from './common/progress.js';
export { WarningSink, warningText, type FeedWarning } from './common/warnings.js';
export { WARNINGS, type WarningCode, type WarningEntry } from './common/warningCodes.js';

// the feed, its patterns and observed data: the stages a program may call one by one
export { readFeed, type HoldDayTables, type ReadFeedOptions, type TripRowsSink } from './gtfs/readFeed.js';
export type { DownloadLimits, FetchOptions } from './gtfs/download.js';
export type { CacheOptions } from './gtfs/downloadCache.js';
export { tripProfiles, type StopTimesStore, type TripProfile } from './gtfs/stopTimesStore.js';
export type {
  Agency,
  CalendarDate,
  CalendarRow,
  Feed,
  FeedInfo,
  Frequency,
  Route,
  Shape,
  Stop,
  Trip,
  TripStopTimes,
} from './gtfs/types.js';
export { buildPatterns, type BuildPatternsOptions } from './network/buildPatterns.js';
export type { DistanceBacktrack, DistanceSource, Pattern, PatternSet } from './network/types.js';
export { observeArchive, type ObserveArchiveOptions } from './realtime/calibrate.js';
export type { ObservedData, ObservedPattern } from './realtime/types.js';

// the model's parameters: every entry point takes them as ParamsInput and checks them with normalizeParams
export {
  PARAM_NAMES,
  PARAM_SPECS,
  defaultParams,
  normalizeParams,
  loadParams,
  type ModelParams,
  type NormalizedParams,
  type ParamName,
  type ParamsInput,
  type StoppingModel,
  type StoppingModelParam,
} from './model/params.js';
export type {
  DemandSource,
  FixedReason,
  LostTimeSource,
  ObservedFigures,
  ObservedLostTimePart,
  ParamValue,
  ParamsReport,
  SourceLabel,
} from './model/types.js';

// the audit and its result
export { auditFeed, type AuditFeedOptions, type AuditFeedOutput } from './audit/auditFeed.js';
export { runAudit, type RunAuditOptions } from './audit/runAudit.js';
export { VERDICTS, type VerdictKind } from './audit/verdictKinds.js';
export { CAUTIONS } from './audit/cautions.js';
export type {
  AuditResult,
  Candidate,
  CostCurvePoint,
  GapResult,
  Headline,
  NetworkPlan,
  PatternResult,
  ReviewGap,
  SensitivityCase,
  StopResult,
  Verdict,
} from './audit/types.js';

// what-if: proposed changes weighed on every pattern they touch
export { evaluateScenario, type EvaluateScenarioOptions } from './whatif/whatif.js';
export {
  parseScenario,
  loadScenarioFile,
  type ScenarioInput,
  type ScenarioPatternEffect,
  type ScenarioResult,
  type ScenarioSensitivity,
  type ScenarioTotals,
  type StopChange,
  type StopFilter,
} from './model/scenario.js';

// feed checks for nightly jobs
export { checkFeed, TripFindings, type CheckOptions, type CheckReport, type Finding, type FindingExample } from './check/check.js';
export {
  DEFAULT_THRESHOLDS,
  FINDINGS,
  FINDING_CODES,
  type CheckThresholds,
  type FindingCode,
  type FindingKind,
  type Severity,
  type SpeedLimitKmh,
  type ThresholdOptions,
} from './check/findings.js';

// two versions of a feed compared
export {
  compareFeeds,
  type CandidateBrief,
  type CompareOptions,
  type Comparison,
  type FeedIdentity,
  type PatternBrief,
  type PatternChange,
  type PatternTripChange,
  type RouteTripChange,
  type SpacingPicture,
  type StopBrief,
  type StopMove,
  type StopRename,
} from './compare/compare.js';

// the run history (SQLite, loaded when a history is opened)
export {
  openHistory,
  recordRun,
  readHistory,
  auditRunRow,
  checkRunRow,
  type HistoryDb,
  type OpenHistoryOptions,
  type ReadHistoryOptions,
  type RunHeadline,
  type RunRecord,
  type RunRow,
} from './history/index.js';

// reports: the audit's folder and its summary.json (schema/summary.schema.json)
export { writeReport, REPORT_FORMATS, type ReportFormat, type WriteReportOptions } from './report/writeReport.js';
export { summaryJson, SUMMARY_SCHEMA_VERSION } from './report/summaryJson.js';
export type { Units } from './report/units.js';

// the land-use layer: where people live and work (read by auditFeed and whatif with --land-use)
export {
  readLandUse,
  parseLandUseWeights,
  DEFAULT_LAND_USE_COLUMNS,
  type LandUseColumn,
  type LandUseLayer,
} from './landuse/readLandUse.js';

export { version } from './version.js';
