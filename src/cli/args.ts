import { FulcraError, type Costs } from '../engine/core';
import { parsePointsBase } from './pointsCli';
import { checkSubgroupArgs, parseSubgroupCuts } from './subgroupsCli';
import type { LambdaRule } from '../engine/workflow';

/** Parsed command line of `npm run fit`. */
export interface FitArgs {
  file: string;
  outcome: string;
  event?: string;
  predictors?: string[];
  categorical: string[];
  reference: Record<string, string>;
  splines: Record<string, 3 | 4 | 5>;
  interactions: Array<[string, string]>;
  /** `--ridge L`: shorthand for `--penalty ridge --lambda L`. */
  ridge?: number;
  firth: boolean;
  penalty?: 'ridge' | 'lasso' | 'elastic-net';
  alpha?: number;
  /** A fixed λ for --penalty (no cross-validation). */
  lambda?: number;
  lambdaRule?: LambdaRule;
  /** Iteration limit of the maximum-likelihood, Firth and ridge fits (default 50). */
  maxIter?: number;
  level?: number;
  costs?: Costs;
  threshold?: number;
  bootstrap?: number;
  seed: number;
  cv?: number;
  test?: string;
  delimiter?: string;
  decimal?: '.' | ',';
  sheet?: string;
  /** Threads for the row passes of large fits (default: the machine's cores, at most 8; the numbers do not change). */
  threads?: number;
  json: boolean;
  /** `--no-profile`: Wald intervals only (no profile-likelihood refits). */
  noProfile: boolean;
  /** `--no-term-tests`: no likelihood-ratio test of each term (one constrained solve per term). */
  noTermTests: boolean;
  /** `--diagnostics`: add the per-row leverage, residuals and influence to the output. */
  diagnostics: boolean;
  /** `--monitor FILE`: risk-adjusted monitoring of a later file of cases with the fitted model. */
  monitor?: string;
  /** `--date COL` (with --monitor): the date column of the monitoring file. */
  date?: string;
  /** `--unit COL` (with --monitor): the unit (ward, team…) column of the monitoring file. */
  unit?: string;
  /** `--period month|quarter` (with --monitor): the calibration-drift period (default month). */
  period?: 'month' | 'quarter';
  /** `--arl0 N` (with --monitor): target in-control average run length of the CUSUMs, in cases (default 5000). */
  arl0?: number;
  /** `--leave-out 12,45`: spreadsheet rows left out of the analysis (recorded in the request). */
  leaveOut?: number[];
  /** `--events COL` with `--trials COL` or `--nonevents COL`: a table of counts (the events column is the outcome). */
  events?: string;
  trials?: string;
  nonEvents?: string;
  /** `--weights COL`: frequency weights (whole numbers ≥ 1), any layout. */
  weights?: string;
  /** `--compare-with a,b,c`: a second model with these predictors, compared with the main one on the same rows. */
  compareWith?: string[];
  /** `--points` (or `--points-base X`): the bedside points score of the fitted model; `pointsBase` its base unit. */
  points?: boolean;
  pointsBase?: import('../engine/points').PointsBaseUnit;
  /** `--subgroups COL`: the model's performance per group of COL; `--subgroup-cuts 40,60,80` bands a numeric COL. */
  subgroups?: string;
  subgroupCuts?: number[];
  help: boolean;
}

export const usage = `Usage: npm run fit -- FILE --outcome COLUMN [options]

Fits a logistic-regression model to FILE (.csv, .tsv, .txt or .xlsx) with the same engine as the page.

  --outcome COL            outcome column, one yes/no value per row (required unless --events is given)
  --events COL             a table of counts: the column of events per row, with one of
  --trials COL               the column of trials (cases) per row, or
  --nonevents COL            the column of non-events per row
                           (every per-case result equals that of the table written out one row per case)
  --weights COL            frequency weights: how many identical cases each row stands for (whole numbers >= 1)
  --event VALUE            outcome level counted as the event (proposed automatically for yes/no, 1/0, ...)
  --predictors a,b,c       predictor columns (default: every other usable column)
  --categorical a,b        treat these columns as categorical
  --reference a=LEVEL      reference level of a categorical predictor (repeatable; default: 0 / no / FALSE of a
                           two-level column such as 0/1, no/yes, FALSE/TRUE, else the most frequent level)
  --spline a=K             restricted cubic spline with K = 3, 4 or 5 knots (repeatable)
  --interaction a:b        pairwise interaction (repeatable)
  --firth                  Firth's penalised likelihood (for small samples and separation)
  --max-iter N             iteration limit of the standard, Firth and ridge fits (1 to 10000, default 50)
  --penalty ridge|lasso|elastic-net   penalised fit; lambda chosen by cross-validation unless --lambda is given
  --lambda L               a fixed lambda >= 0 for --penalty (> 0 for ridge), no cross-validation
  --ridge L                shorthand for --penalty ridge --lambda L
  --alpha A                elastic-net mixing (0..1, default 0.5 for elastic-net)
  --lambda-rule cv-1se|cv-min   lambda by the one-standard-error rule (default) or the lowest CV deviance
                           Penalised fits minimise (glmnet's convention)
                             −(1/n)·loglik + λ·[(1−α)/2·‖β‖² + α·‖β‖₁]
                           over β on standardised predictors (unit population SD, i.e. dividing by n),
                           intercept not penalised; α = 1 lasso, 0 ridge, --alpha for elastic-net.
                           Coefficients are reported on the original scale.
  --level L                confidence level of every interval (default 0.95)
  --costs MISSED:ALARM     cost of a missed case : cost of a false alarm, e.g. 10:1
  --threshold P            probability cut-off to report the confusion matrix at
  --bootstrap B            bootstrap optimism correction with B resamples
  --cv K                   K folds of the lambda cross-validation (--penalty without --lambda); otherwise
                           validation by K-fold cross-validation repeated 10 times
  --seed S                 random seed (default 1)
  --test FILE              external validation on a second file with the same columns
  --delimiter D            override the detected delimiter (, ; tab |)
  --decimal . | ,          override the detected decimal mark
  --sheet NAME             sheet of an .xlsx file
  --threads T              threads for fits of 32 768 rows or more (default: all cores, at most 8);
                           the same numbers on any T
  --json                   print the full result record as JSON
  --no-profile             skip the profile-likelihood intervals (two solves per coefficient); Wald intervals stay
  --no-term-tests          skip the likelihood-ratio test of each term (one solve per term); Wald p-values stay
  --diagnostics            add per-row leverage, standardised residuals, Cook's distance and DFBETAS (with
                           spreadsheet row numbers) and the most influential rows to the output
  --leave-out 12,45        leave these spreadsheet rows out of the fit (recorded in the output); the file is unchanged
  --monitor FILE           risk-adjusted monitoring of later cases in FILE with the fitted model: O/E, funnel plot by
                           unit, CUSUMs for doubled / halved odds, cumulative O − E, calibration by period
  --date COL               the date column of the --monitor file (dates, date text or spreadsheet serial dates)
  --unit COL               the unit column of the --monitor file (ward, team, ...) for the funnel plot
  --period month|quarter   calibration-drift period of --monitor (default month)
  --arl0 N                 target in-control average run length of the CUSUMs, in cases (default 5000)
  --compare-with a,b,c     fit a second model with these predictors (same outcome, method and rows) and compare it
                           with the main one: LR test when nested, AUC difference (paired DeLong), Brier,
                           calibration, net benefit, who changes side of the cut-off; on different rows (missing
                           values) both are refitted on the rows they share, and the output says so
  --points                 the bedside points score (Sullivan et al. 2004): points per category of each predictor,
                           total points to risk, the score's AUC and calibration beside the model's
  --points-base X          its base unit: auto (default: the strongest predictor spans 10 points), a number (log
                           odds per point) or COLUMN:INCREASE (one point = that increase, e.g. age:5); implies --points
  --subgroups COL          performance per group of COL (each category, or each value of a numeric column): n,
                           events, O/E, AUC, calibration, sensitivity/specificity/flagged at --threshold, with
                           the too-small rule (not with --events or --weights)
  --subgroup-cuts 40,60,80 cut a numeric --subgroups column into bands (< 40, 40 to < 60, 60 to < 80, >= 80)
  --help                   this text
`;

const numberArg = (flag: string, v: string | undefined): number => {
  const x = Number(v);
  if (v === undefined || v.trim() === '' || !Number.isFinite(x)) {
    throw new FulcraError('bad-argument', `${flag} needs a number, got "${v ?? ''}".`);
  }
  return x;
};

/** Parses argv (without node and script) into FitArgs; throws FulcraError naming the bad flag. */
export function parseFitArgs(argv: string[]): FitArgs {
  const a: FitArgs = {
    file: '',
    outcome: '',
    categorical: [],
    reference: {},
    splines: {},
    interactions: [],
    firth: false,
    seed: 1,
    json: false,
    noProfile: false,
    noTermTests: false,
    diagnostics: false,
    help: false,
  };
  const list = (v: string | undefined) =>
    (v ?? '')
      .split(',')
      .map((s) => s.trim())
      .filter(Boolean);
  for (let i = 0; i < argv.length; i++) {
    const flag = argv[i];
    const value = () => {
      const v = argv[++i];
      if (v === undefined) throw new FulcraError('bad-argument', `${flag} needs a value.`);
      return v;
    };
    switch (flag) {
      case '--outcome':
        a.outcome = value();
        break;
      case '--event':
        a.event = value();
        break;
      case '--predictors':
        a.predictors = list(value());
        break;
      case '--categorical':
        a.categorical.push(...list(value()));
        break;
      case '--reference': {
        const [col, level] = splitOnce(value(), '=', flag);
        a.reference[col] = level;
        break;
      }
      case '--spline': {
        const [col, k] = splitOnce(value(), '=', flag);
        const knots = numberArg(flag, k);
        if (knots !== 3 && knots !== 4 && knots !== 5) {
          throw new FulcraError('bad-argument', `--spline ${col}=${k}: the number of knots must be 3, 4 or 5.`);
        }
        a.splines[col] = knots;
        break;
      }
      case '--interaction': {
        const [x, y] = splitOnce(value(), ':', flag);
        a.interactions.push([x, y]);
        break;
      }
      case '--firth':
        a.firth = true;
        break;
      case '--ridge':
        a.ridge = numberArg(flag, value());
        break;
      case '--penalty': {
        const v = value();
        if (v !== 'ridge' && v !== 'lasso' && v !== 'elastic-net') {
          throw new FulcraError(
            'bad-argument',
            `--penalty must be ridge, lasso or elastic-net, got "${v}".` +
              (v === 'enet' || v === 'elasticnet' ? ' Elastic net is written elastic-net.' : ''),
          );
        }
        a.penalty = v;
        break;
      }
      case '--alpha':
        a.alpha = numberArg(flag, value());
        break;
      case '--lambda': {
        const v = numberArg(flag, value());
        if (!(v >= 0)) throw new FulcraError('bad-argument', `--lambda must be a number ≥ 0, got ${v}.`);
        a.lambda = v;
        break;
      }
      case '--max-iter': {
        const v = value();
        const t = numberArg(flag, v);
        if (!Number.isInteger(t) || t < 1 || t > 10_000)
          throw new FulcraError('bad-argument', `--max-iter must be a whole number from 1 to 10000, got "${v}".`);
        a.maxIter = t;
        break;
      }
      case '--lambda-rule': {
        const v = value();
        if (v !== 'cv-1se' && v !== 'cv-min')
          throw new FulcraError('bad-argument', `--lambda-rule must be cv-1se or cv-min, got "${v}".`);
        a.lambdaRule = v;
        break;
      }
      case '--level': {
        const v = numberArg(flag, value());
        if (!(v > 0 && v < 1)) throw new FulcraError('bad-argument', `--level must be between 0 and 1, got ${v}.`);
        a.level = v;
        break;
      }
      case '--costs': {
        const [missed, alarm] = splitOnce(value(), ':', flag);
        a.costs = {
          missedCase: numberArg('--costs MISSED', missed),
          falseAlarm: numberArg('--costs ALARM', alarm),
        };
        if (!(a.costs.missedCase > 0 && a.costs.falseAlarm > 0)) {
          throw new FulcraError('bad-argument', '--costs MISSED:ALARM needs two positive numbers, e.g. 10:1.');
        }
        break;
      }
      case '--threshold':
        a.threshold = numberArg(flag, value());
        break;
      case '--bootstrap':
        a.bootstrap = numberArg(flag, value());
        break;
      case '--cv':
        a.cv = numberArg(flag, value());
        break;
      case '--seed':
        a.seed = numberArg(flag, value());
        break;
      case '--threads': {
        const t = numberArg(flag, value());
        if (!Number.isInteger(t) || t < 1 || t > 64)
          throw new FulcraError('bad-argument', `--threads must be a whole number from 1 to 64, got ${t}.`);
        a.threads = t;
        break;
      }
      case '--test':
        a.test = value();
        break;
      case '--delimiter': {
        const v = value();
        a.delimiter = v === 'tab' ? '\t' : v;
        break;
      }
      case '--decimal': {
        const v = value();
        if (v !== '.' && v !== ',') throw new FulcraError('bad-argument', `--decimal must be . or , (got "${v}").`);
        a.decimal = v;
        break;
      }
      case '--sheet':
        a.sheet = value();
        break;
      case '--json':
        a.json = true;
        break;
      case '--no-profile':
        a.noProfile = true;
        break;
      case '--no-term-tests':
        a.noTermTests = true;
        break;
      case '--diagnostics':
        a.diagnostics = true;
        break;
      case '--leave-out': {
        const rows = list(value()).map(Number);
        if (rows.length === 0 || rows.some((r) => !Number.isInteger(r) || r < 1)) {
          throw new FulcraError('bad-argument', '--leave-out needs spreadsheet row numbers, e.g. --leave-out 12,45.');
        }
        a.leaveOut = rows;
        break;
      }
      case '--monitor':
        a.monitor = value();
        break;
      case '--events':
        a.events = value();
        break;
      case '--trials':
        a.trials = value();
        break;
      case '--nonevents':
      case '--non-events':
        a.nonEvents = value();
        break;
      case '--weights':
        a.weights = value();
        break;
      case '--compare-with':
        a.compareWith = list(value());
        if (a.compareWith.length === 0)
          throw new FulcraError('bad-argument', '--compare-with needs predictor columns, e.g. --compare-with age,asa.');
        break;
      case '--points':
        a.points = true;
        break;
      case '--points-base':
        a.points = true;
        a.pointsBase = parsePointsBase(value());
        break;
      case '--subgroups':
        a.subgroups = value();
        break;
      case '--subgroup-cuts':
        a.subgroupCuts = parseSubgroupCuts(value());
        break;
      case '--date':
        a.date = value();
        break;
      case '--unit':
        a.unit = value();
        break;
      case '--period': {
        const v = value();
        if (v !== 'month' && v !== 'quarter')
          throw new FulcraError('bad-argument', `--period must be month or quarter, got "${v}".`);
        a.period = v;
        break;
      }
      case '--arl0': {
        const v = numberArg(flag, value());
        if (!(v >= 10 && v <= 1e6))
          throw new FulcraError('bad-argument', `--arl0 must be a number of cases from 10 to 1000000, got ${v}.`);
        a.arl0 = v;
        break;
      }
      case '--help':
      case '-h':
        a.help = true;
        break;
      default:
        if (flag.startsWith('--')) throw new FulcraError('bad-argument', `Unknown option ${flag}. See --help.`);
        if (a.file) throw new FulcraError('bad-argument', `Only one data file, got "${a.file}" and "${flag}".`);
        a.file = flag;
    }
  }
  if (a.help) return a;
  if (!a.file) throw new FulcraError('bad-argument', 'Name the data file, e.g. npm run fit -- data.csv --outcome y.');
  checkLayoutArgs(a);
  if (!a.outcome) throw new FulcraError('bad-argument', 'Name the outcome column with --outcome COLUMN.');
  if (a.threshold !== undefined && !(a.threshold > 0 && a.threshold < 1)) {
    throw new FulcraError('bad-argument', `--threshold must be between 0 and 1, got ${a.threshold}.`);
  }
  if ([a.firth, a.ridge !== undefined, a.penalty !== undefined].filter(Boolean).length > 1) {
    throw new FulcraError('bad-argument', 'Choose one of --firth, --ridge and --penalty.');
  }
  checkLambda(a);
  checkMonitor(a);
  checkSubgroupArgs(a);
  return a;
}

/** --date, --unit, --period and --arl0 go with --monitor, which needs --date. */
function checkMonitor(a: FitArgs): void {
  const extra = (['date', 'unit', 'period', 'arl0'] as const).filter((k) => a[k] !== undefined);
  if (a.monitor === undefined) {
    if (extra.length)
      throw new FulcraError('bad-argument', `--${extra[0]} goes with --monitor FILE (monitoring of later cases).`);
    return;
  }
  if (a.date === undefined)
    throw new FulcraError('bad-argument', '--monitor needs --date COLUMN, the column holding each case’s date.');
}

/** --lambda goes with --penalty, and a fixed λ excludes a λ rule; ridge needs λ > 0. */
function checkLambda(a: FitArgs): void {
  if (a.lambda === undefined) return;
  if (a.penalty === undefined) {
    throw new FulcraError(
      'bad-argument',
      '--lambda needs --penalty ridge, lasso or elastic-net' +
        (a.ridge !== undefined ? ' (--ridge L already sets λ).' : '.'),
    );
  }
  if (a.lambdaRule !== undefined) {
    throw new FulcraError('bad-argument', 'Give either --lambda (a fixed λ) or --lambda-rule (λ by cross-validation).');
  }
  if (a.penalty === 'ridge' && a.lambda === 0) {
    throw new FulcraError(
      'bad-argument',
      '--penalty ridge needs --lambda > 0; leave out --penalty for an unpenalised fit.',
    );
  }
}

function splitOnce(v: string, sep: string, flag: string): [string, string] {
  const k = v.indexOf(sep);
  if (k <= 0 || k === v.length - 1) {
    throw new FulcraError('bad-argument', `${flag} expects NAME${sep}VALUE, got "${v}".`);
  }
  return [v.slice(0, k), v.slice(k + 1)];
}

/** --events needs exactly one of --trials and --nonevents (and replaces --outcome); they need --events. */
function checkLayoutArgs(a: FitArgs): void {
  if (a.events === undefined) {
    if (a.trials !== undefined || a.nonEvents !== undefined)
      throw new FulcraError(
        'bad-argument',
        `${a.trials !== undefined ? '--trials' : '--nonevents'} needs --events COL (the column of event counts).`,
      );
    return;
  }
  if (a.outcome && a.outcome !== a.events)
    throw new FulcraError(
      'bad-argument',
      `--outcome ${a.outcome} and --events ${a.events}: a table of counts has its events column as the outcome; ` +
        'give only --events.',
    );
  if ((a.trials === undefined) === (a.nonEvents === undefined))
    throw new FulcraError(
      'bad-argument',
      '--events COL needs one of --trials COL (cases per row) or --nonevents COL (non-events per row).',
    );
  if (a.event !== undefined)
    throw new FulcraError('bad-argument', '--event does not apply to a table of counts (--events): drop it.');
  a.outcome = a.events;
}
