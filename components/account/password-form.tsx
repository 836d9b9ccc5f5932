"use client";
import { useState } from "react";
import { changePassword } from "@/app/(app)/account/actions/change-password";
import { Field, inputClass } from "@/components/ui/field";
import { Button } from "@/components/ui/button";

export function PasswordForm() {
  const [msg, setMsg] = useState<{ ok: boolean; text: string; issues?: Record<string, string> } | null>(null);
  async function submit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const f = new FormData(form);
    const res = await changePassword({ current: String(f.get("current")), next: String(f.get("next")) });
    if ("error" in res) setMsg({ ok: false, text: res.error.message, issues: Object.fromEntries((res.error.issues ?? []).map((i) => [i.path, i.message])) });
    else { setMsg({ ok: true, text: "Password changed." }); form.reset(); }
  }
  return (
    <form onSubmit={submit} className="space-y-3">
      <Field label="Current password" error={msg?.issues?.["/current"]}><input name="current" type="password" autoComplete="current-password" required className={inputClass} /></Field>
      <Field label="New password" hint="at least 10 characters" error={msg?.issues?.["/next"]}><input name="next" type="password" autoComplete="new-password" required minLength={10} className={inputClass} /></Field>
      {msg ? <p role="status" className={`text-sm ${msg.ok ? "text-state-done" : "text-danger"}`}>{msg.text}</p> : null}
      <Button type="submit">Change password</Button>
    </form>
  );
}
