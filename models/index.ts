// Every model, initialised on a Sequelize instance with its associations; db() for the app's instance.
import type { Sequelize } from "sequelize";
import { getSequelize } from "@/lib/db/sequelize";
import { associate } from "./associations";
import { User, initUser } from "./user";
import { Group, initGroup } from "./group";
import { Membership, initMembership } from "./membership";
import { ApiToken, initApiToken } from "./api-token";
import { SignInAttempt, initSignInAttempt } from "./sign-in-attempt";
import { AuditEntry, initAuditEntry } from "./audit-entry";
import { Allocation, initAllocation } from "./allocation";
import { LedgerEntry, initLedgerEntry } from "./ledger-entry";
import { AllocationCap, AllocationCapNotice, AllocationStateChange, initAllocationCap, initAllocationCapNotice, initAllocationStateChange } from "./allocation-history";
import { Cluster, initCluster } from "./cluster";
import { Sampler, initSampler } from "./sampler";
import { Ensemble, initEnsemble } from "./ensemble";
import { ParameterPoint, initParameterPoint } from "./parameter-point";
import { Run, initRun } from "./run";
import { RunEvent, initRunEvent } from "./run-event";
import { Artifact, initArtifact } from "./artifact";
import { RunArtifact, initRunArtifact } from "./run-artifact";
import { Import, initImport } from "./import";
import { Series, initSeries } from "./series";
import { Estimate, initEstimate } from "./estimate";
import { Manuscript, initManuscript } from "./manuscript";
import { Exhibit, initExhibit } from "./exhibit";
import { OutboxMessage, initOutboxMessage } from "./outbox-message";
import { SavedView, initSavedView } from "./saved-view";
import { PlannerPrediction, initPlannerPrediction } from "./planner-prediction";
import { PlannerOutcome, initPlannerOutcome } from "./planner-outcome";

export * from "./user";
export * from "./group";
export * from "./membership";
export * from "./api-token";
export * from "./sign-in-attempt";
export * from "./audit-entry";
export * from "./allocation";
export * from "./ledger-entry";
export * from "./allocation-history";
export * from "./cluster";
export * from "./sampler";
export * from "./ensemble";
export * from "./parameter-point";
export * from "./run";
export * from "./run-event";
export * from "./artifact";
export * from "./run-artifact";
export * from "./import";
export * from "./series";
export * from "./estimate";
export * from "./manuscript";
export * from "./exhibit";
export * from "./outbox-message";
export * from "./saved-view";
export * from "./planner-prediction";
export * from "./planner-outcome";

const definitions = {
  User: [User, initUser],
  Group: [Group, initGroup],
  Membership: [Membership, initMembership],
  ApiToken: [ApiToken, initApiToken],
  SignInAttempt: [SignInAttempt, initSignInAttempt],
  AuditEntry: [AuditEntry, initAuditEntry],
  Allocation: [Allocation, initAllocation],
  LedgerEntry: [LedgerEntry, initLedgerEntry],
  AllocationStateChange: [AllocationStateChange, initAllocationStateChange],
  AllocationCap: [AllocationCap, initAllocationCap],
  AllocationCapNotice: [AllocationCapNotice, initAllocationCapNotice],
  Cluster: [Cluster, initCluster],
  Sampler: [Sampler, initSampler],
  Ensemble: [Ensemble, initEnsemble],
  ParameterPoint: [ParameterPoint, initParameterPoint],
  Run: [Run, initRun],
  RunEvent: [RunEvent, initRunEvent],
  Artifact: [Artifact, initArtifact],
  RunArtifact: [RunArtifact, initRunArtifact],
  Import: [Import, initImport],
  Series: [Series, initSeries],
  Estimate: [Estimate, initEstimate],
  Manuscript: [Manuscript, initManuscript],
  Exhibit: [Exhibit, initExhibit],
  OutboxMessage: [OutboxMessage, initOutboxMessage],
  SavedView: [SavedView, initSavedView],
  PlannerPrediction: [PlannerPrediction, initPlannerPrediction],
  PlannerOutcome: [PlannerOutcome, initPlannerOutcome],
} as const;

type Definitions = typeof definitions;
/** The model classes of one Sequelize instance. */
export type ModelSet = { [K in keyof Definitions]: Definitions[K][0] };
/** What initModels and db() return: the instance and its model classes. */
export type Models = ModelSet & { sequelize: Sequelize };

const initialised = new WeakMap<Sequelize, Models>();
let primary: Sequelize | undefined;

/**
 * Initialise every model and association on `sequelize` (idempotent per instance).
 *
 * The exported classes (User, Run, …) are bound to the first instance initialised, which in the
 * app is getSequelize() and in an integration test the test database. Any further instance gets
 * its own subclasses, because a Sequelize model class can belong to one instance only; code that
 * must work against several databases uses the returned classes, not the imports.
 */
export function initModels(sequelize: Sequelize): Models {
  const known = initialised.get(sequelize);
  if (known) return known;
  const bindExported = primary === undefined;
  primary ??= sequelize;
  const set = {} as Record<string, unknown>;
  // The per-model types cannot survive iteration; the ModelSet type restores them below.
  type AnyDefinition = readonly [typeof User, (s: Sequelize, M: typeof User) => typeof User];
  for (const [name, [Base, init]] of Object.entries(definitions) as unknown as [string, AnyDefinition][]) {
    const Target = bindExported ? Base : class extends Base {};
    set[name] = init(sequelize, Target);
  }
  const models = { ...(set as ModelSet), sequelize };
  associate(models);
  initialised.set(sequelize, models);
  return models;
}

/** The models on the process-wide instance (lib/db/sequelize.ts getSequelize()); call inside functions. */
export function db(): Models {
  return initModels(getSequelize());
}
