import { db } from "@/models";
import { hasRole, pageIdentity } from "@/lib/auth/page-identity";
import { RESEARCHERS } from "@/lib/auth/roles";
import { formatBytes, uploadLimits } from "@/lib/uploads/limits";
import { listImports } from "@/lib/uploads/list-imports";
import { PageHeader } from "@/components/ui/page-header";
import { ImportsTable } from "@/components/archive/imports-table";
import { UploadForm } from "@/components/archive/upload-form";

export const metadata = { title: "Archive" };
export const dynamic = "force-dynamic";

export default async function ArchivePage() {
  const who = await pageIdentity();
  const limits = uploadLimits();
  const [list, groups] = await Promise.all([
    listImports(who, { pageSize: 100 }),
    db().Group.findAll({ where: { id: who.groupIds }, order: [["name", "ASC"]], attributes: ["id", "name"] }),
  ]);
  const stated = `Limits per upload: ${formatBytes(limits.maxBytes)} sent, ${formatBytes(limits.maxUnpackedBytes)} unpacked, ${limits.maxFiles.toLocaleString()} files.`;
  return (
    <>
      <PageHeader title="Archive" purpose="Every imported result bundle, from the cluster or uploaded from elsewhere, and why any was refused." />
      {hasRole(who, RESEARCHERS) ? <UploadForm limits={stated} groups={groups.map((g) => ({ id: g.id, name: g.name }))} /> : null}
      <h2 className="font-medium mb-2">Imports</h2>
      <ImportsTable rows={list.data} total={list.total} />
    </>
  );
}
