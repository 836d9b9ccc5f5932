"use client";
import { useState } from "react";
import { createPerson } from "@/app/(app)/people/actions/create-person";
import { ROLES } from "@/lib/auth/roles";
import { Field, inputClass } from "@/components/ui/field";
import { Button } from "@/components/ui/button";

export function NewPersonForm({ groups }: { groups: { id: string; name: string }[] }) {
  const [issues, setIssues] = useState<Record<string, string>>({});
  const [msg, setMsg] = useState<string | null>(null);
  async function submit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const f = new FormData(form);
    const res = await createPerson({
      email: String(f.get("email")), name: String(f.get("name")), role: String(f.get("role")), password: String(f.get("password")),
      groupIds: f.getAll("groupIds").map(String),
    });
    if ("error" in res) { setIssues(Object.fromEntries((res.error.issues ?? []).map((i) => [i.path, i.message]))); setMsg(res.error.message); }
    else { setIssues({}); setMsg(`${res.data.name} can now sign in as ${res.data.role}.`); form.reset(); }
  }
  return (
    <form onSubmit={submit} className="grid gap-3 md:grid-cols-2">
      <Field label="Name" error={issues["/name"]}><input name="name" required className={inputClass} /></Field>
      <Field label="E-mail" error={issues["/email"]}><input name="email" type="email" required className={inputClass} /></Field>
      <Field label="Role" error={issues["/role"]}>
        <select name="role" defaultValue="researcher" className={inputClass}>{ROLES.map((r) => <option key={r}>{r}</option>)}</select>
      </Field>
      <Field label="Initial password" hint="at least 10 characters; they change it on the Account page" error={issues["/password"]}>
        <input name="password" type="password" minLength={10} required className={inputClass} />
      </Field>
      <fieldset className="text-sm md:col-span-2">
        <legend className="font-medium text-ink-soft mb-1">Groups</legend>
        {groups.map((g) => <label key={g.id} className="mr-4"><input type="checkbox" name="groupIds" value={g.id} /> {g.name}</label>)}
      </fieldset>
      {msg ? <p role="status" className="text-sm md:col-span-2">{msg}</p> : null}
      <div className="md:col-span-2"><Button type="submit">Add person</Button></div>
    </form>
  );
}
