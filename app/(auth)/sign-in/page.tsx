import { Logo } from "@/components/shell/logo";
import { SignInForm } from "@/components/auth/sign-in-form";

export const metadata = { title: "Sign in" };

export default function SignInPage() {
  return (
    <main className="min-h-screen grid place-items-center px-4">
      <div className="w-full max-w-sm">
        <div className="mb-6"><Logo /></div>
        <h1 className="text-lg font-semibold">Sign in</h1>
        <p className="text-sm text-ink-soft mb-5">The job broker and results archive of your group&apos;s Monte Carlo ensembles.</p>
        <SignInForm />
      </div>
    </main>
  );
}
