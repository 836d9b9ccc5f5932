import { pageIdentity, hasRole } from "@/lib/auth/page-identity";
import { ADMINS } from "@/lib/auth/roles";
import { listPeople } from "@/lib/people/manage-people";
import { PageHeader } from "@/components/ui/page-header";
import { Card } from "@/components/ui/card";
import { Refusal } from "@/components/ui/refusal";
import { PeopleTable } from "@/components/people/people-table";
import { NewPersonForm } from "@/components/people/new-person-form";

export const metadata = { title: "People" };

export default async function PeoplePage() {
  const who = await pageIdentity();
  if (!hasRole(who, ADMINS)) return <Refusal what="The People page" who="admins" />;
  const { people, groups } = await listPeople();
  return (
    <>
      <PageHeader title="People" purpose="Who may sign in, with which role, in which groups." />
      <div className="space-y-4">
        <Card title={`${people.length} people`}>
          <PeopleTable me={who.userId} groups={groups} people={people.map((p) => ({ ...p, lastSignInAt: p.lastSignInAt ? new Date(p.lastSignInAt).toISOString() : null }))} />
        </Card>
        <Card title="Add a person"><NewPersonForm groups={groups} /></Card>
      </div>
    </>
  );
}
