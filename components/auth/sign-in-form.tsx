"use client";
import { useState } from "react";
import { signIn } from "next-auth/react";
import { useRouter } from "next/navigation";
import { Field, inputClass } from "@/components/ui/field";
import { Button } from "@/components/ui/button";

export function SignInForm() {
  const router = useRouter();
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  async function submit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    setBusy(true);
    setError(null);
    const res = await signIn("credentials", { redirect: false, email: String(form.get("email")), password: String(form.get("password")) });
    setBusy(false);
    if (!res || res.error) {
      setError(res?.error && res.error !== "CredentialsSignin" ? res.error : "wrong e-mail or password");
      return;
    }
    router.replace("/");
    router.refresh();
  }
  return (
    <form onSubmit={submit} className="space-y-4 rounded-lg border border-line bg-paper-raised p-5">
      <Field label="E-mail"><input name="email" type="email" autoComplete="username" required className={inputClass} /></Field>
      <Field label="Password"><input name="password" type="password" autoComplete="current-password" required className={inputClass} /></Field>
      {error ? <p role="alert" data-testid="sign-in-error" className="text-sm text-danger">{error}</p> : null}
      <Button type="submit" disabled={busy} className="w-full justify-center">{busy ? "Signing in…" : "Sign in"}</Button>
    </form>
  );
}
