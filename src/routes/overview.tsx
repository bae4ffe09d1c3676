import { useSuspenseQuery } from "@tanstack/react-query";
import { meQueries } from "@/features/session/api/me-queries";
import { Card } from "@/components/ui/states";
import { roleLabels } from "@shared/roles";

export function Component() {
  const { data: me } = useSuspenseQuery(meQueries.current());
  if (!me) return null;
  return (
    <div className="space-y-4">
      <h1 className="text-2xl font-bold">Overview</h1>
      <Card title={`Signed in as ${me.name}`}>
        <p>
          {me.roles.map((r) => roleLabels[r]).join(", ")} ·{" "}
          {me.scope.kind === "all" ? "every shop of the group" : `shops ${me.scope.shops.join(", ")}`}
        </p>
      </Card>
    </div>
  );
}
