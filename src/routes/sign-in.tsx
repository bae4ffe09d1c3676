import { useLocation } from "react-router-dom";
import { LogoMark } from "@/components/logo-mark";
import { apiPaths } from "@shared/api-paths";

export function SignInScreen({ signedOut = false }: { signedOut?: boolean }) {
  const location = useLocation();
  const returnTo = signedOut ? "/" : location.pathname + location.search;
  return (
    <div className="grid min-h-screen place-items-center px-4">
      <div className="w-full max-w-md rounded-xl border border-line bg-card p-8 shadow-sm">
        <div className="flex items-center gap-3">
          <LogoMark size={40} />
          <h1 className="text-2xl font-bold">Ironledger</h1>
        </div>
        <p className="mt-4 text-muted">
          {signedOut
            ? "You are signed out."
            : "Failure and repair analytics for every shop of the group. Sign in with your group account."}
        </p>
        <a href={apiPaths.login(returnTo)} className="mt-6 block rounded-lg bg-accent px-4 py-2.5 text-center font-semibold text-white">
          Sign in
        </a>
      </div>
    </div>
  );
}

export function SignedOutRoute() {
  return <SignInScreen signedOut />;
}
