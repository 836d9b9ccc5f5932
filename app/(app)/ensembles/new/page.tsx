import Link from "next/link";
import { db } from "@/models";
import { pageIdentity, hasRole } from "@/lib/auth/page-identity";
import { RESEARCHERS } from "@/lib/auth/roles";
import { PageHeader } from "@/components/ui/page-header";
import { Refusal } from "@/components/ui/refusal";
import { NewEnsembleForm } from "@/components/ensembles/new-ensemble-form";
import { EXAMPLE_SPEC } from "@/components/ensembles/example-spec";
import { randomSeed, type ParamsSchema } from "@/components/ensembles/spec-draft";

export const metadata = { title: "New ensemble" };

export default async function NewEnsemblePage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  const who = await pageIdentity();
  if (!hasRole(who, RESEARCHERS)) return <Refusal what="Submitting an ensemble" who="researchers, PIs and admins" />;
  const { example } = await searchParams;
  const samplers = await db().Sampler.findAll({ order: [["name", "ASC"], ["version", "DESC"]] });
  return (
    <>
      <PageHeader title="New ensemble" purpose="Describe the scan, check the preview, and reserve its core-hours in one submission."
        actions={<Link href="/ensembles" className="text-sm text-accent hover:underline self-center">← all ensembles</Link>} />
      <NewEnsembleForm seed={randomSeed()} example={example ? (structuredClone(EXAMPLE_SPEC) as unknown as Record<string, unknown>) : null}
        samplers={samplers.map((s) => ({ name: s.name, version: s.version, description: s.description ?? null, paramsSchema: s.paramsSchema as ParamsSchema }))} />
    </>
  );
}
