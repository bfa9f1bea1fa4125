/**
 * The two costs of a decision at a cut-off, in any one unit: a missed case (an event not flagged, a false
 * negative) and a false alarm (a non-event flagged, a false positive). One name per concept everywhere: the
 * engine, the worker, the page, the model file, the report and `npm run fit --costs MISSED:ALARM`.
 */
export interface Costs {
  missedCase: number;
  falseAlarm: number;
}
