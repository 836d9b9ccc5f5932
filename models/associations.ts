// Associations between the models; aliases ("as") are the property names used in includes.
import type { ModelSet } from "./index";

/** Declare every association on one set of model classes. */
export function associate(m: ModelSet): void {
  const { User, Group, Membership, ApiToken, AuditEntry, Allocation, LedgerEntry, Cluster, Sampler, Ensemble,
    ParameterPoint, Run, RunEvent, Artifact, RunArtifact, Import, Series, Estimate, Manuscript, Exhibit, SavedView } = m;

  User.hasMany(Membership, { as: "memberships", foreignKey: "userId" });
  Group.hasMany(Membership, { as: "memberships", foreignKey: "groupId" });
  Membership.belongsTo(User, { as: "user", foreignKey: "userId" });
  Membership.belongsTo(Group, { as: "group", foreignKey: "groupId" });
  User.belongsToMany(Group, { through: Membership, as: "groups", foreignKey: "userId", otherKey: "groupId" });
  Group.belongsToMany(User, { through: Membership, as: "members", foreignKey: "groupId", otherKey: "userId" });

  User.hasMany(ApiToken, { as: "apiTokens", foreignKey: "userId" });
  ApiToken.belongsTo(User, { as: "user", foreignKey: "userId" });
  AuditEntry.belongsTo(User, { as: "actor", foreignKey: "actorId" });

  Group.hasMany(Allocation, { as: "allocations", foreignKey: "groupId" });
  Allocation.belongsTo(Group, { as: "group", foreignKey: "groupId" });
  Allocation.hasMany(LedgerEntry, { as: "entries", foreignKey: "allocationId" });
  LedgerEntry.belongsTo(Allocation, { as: "allocation", foreignKey: "allocationId" });

  Ensemble.belongsTo(User, { as: "owner", foreignKey: "ownerId" });
  Ensemble.belongsTo(Group, { as: "group", foreignKey: "groupId" });
  Ensemble.belongsTo(Sampler, { as: "sampler", foreignKey: "samplerId" });
  Ensemble.belongsTo(Allocation, { as: "allocation", foreignKey: "allocationId" });
  Ensemble.belongsTo(Cluster, { as: "cluster", foreignKey: "clusterId" });
  Ensemble.hasMany(ParameterPoint, { as: "points", foreignKey: "ensembleId" });
  Ensemble.hasMany(Run, { as: "runs", foreignKey: "ensembleId" });
  ParameterPoint.belongsTo(Ensemble, { as: "ensemble", foreignKey: "ensembleId" });
  ParameterPoint.hasMany(Run, { as: "runs", foreignKey: "pointId" });

  Run.belongsTo(Ensemble, { as: "ensemble", foreignKey: "ensembleId" });
  Run.belongsTo(ParameterPoint, { as: "point", foreignKey: "pointId" });
  Run.hasMany(RunEvent, { as: "events", foreignKey: "runId" });
  Run.hasMany(RunArtifact, { as: "artifacts", foreignKey: "runId" });
  Run.hasMany(Series, { as: "series", foreignKey: "runId" });
  Run.hasMany(Estimate, { as: "estimates", foreignKey: "runId" });
  Run.hasMany(Import, { as: "imports", foreignKey: "runId" });
  RunEvent.belongsTo(Run, { as: "run", foreignKey: "runId" });
  RunEvent.belongsTo(User, { as: "actor", foreignKey: "actorId" });

  RunArtifact.belongsTo(Run, { as: "run", foreignKey: "runId" });
  RunArtifact.belongsTo(Artifact, { as: "artifact", foreignKey: "artifactSha256", targetKey: "sha256" });
  Artifact.hasMany(RunArtifact, { as: "uses", foreignKey: "artifactSha256", sourceKey: "sha256" });
  Import.belongsTo(Run, { as: "run", foreignKey: "runId" });
  Import.belongsTo(User, { as: "uploadedBy", foreignKey: "uploadedById" });
  Series.belongsTo(Run, { as: "run", foreignKey: "runId" });

  Estimate.belongsTo(Run, { as: "run", foreignKey: "runId" });
  Estimate.belongsTo(ParameterPoint, { as: "point", foreignKey: "pointId" });
  Estimate.belongsTo(Ensemble, { as: "ensemble", foreignKey: "ensembleId" });
  Estimate.belongsTo(User, { as: "chosenBy", foreignKey: "chosenById" });
  ParameterPoint.hasMany(Estimate, { as: "estimates", foreignKey: "pointId" });

  Manuscript.belongsTo(Group, { as: "group", foreignKey: "groupId" });
  Manuscript.belongsTo(User, { as: "createdBy", foreignKey: "createdById" });
  Manuscript.belongsTo(User, { as: "frozenBy", foreignKey: "frozenById" });
  Manuscript.hasMany(Exhibit, { as: "exhibits", foreignKey: "manuscriptId" });
  Exhibit.belongsTo(Manuscript, { as: "manuscript", foreignKey: "manuscriptId" });

  SavedView.belongsTo(User, { as: "owner", foreignKey: "ownerId" });
  SavedView.belongsTo(Group, { as: "group", foreignKey: "groupId" });

  m.PlannerPrediction.belongsTo(User, { as: "user", foreignKey: "userId" });
  m.PlannerOutcome.belongsTo(m.PlannerPrediction, { as: "prediction", foreignKey: "predictionId" });
  m.PlannerOutcome.belongsTo(Ensemble, { as: "ensemble", foreignKey: "ensembleId" });
}
