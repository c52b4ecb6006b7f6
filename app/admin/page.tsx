import type { Metadata } from "next";
import { requirePageAdmin } from "@/lib/auth";
import { fetchUsers } from "@/db/queries/users";
import { fetchMemberships } from "@/db/queries/memberships";
import { fetchTrialsForUser } from "@/db/queries/trials";
import { Card } from "@/components/ui/card";
import { Badge } from "@/components/ui/badge";
import { ROLE_LABELS } from "@/lib/auth/permissions";
import { AccountActions, AssignRoleForm, CreateAccountForm, RemoveRoleButton } from "./forms";

export const metadata: Metadata = { title: "Administration" };

export default async function AdminPage() {
  const admin = await requirePageAdmin();
  const [users, memberships, trials] = await Promise.all([fetchUsers(), fetchMemberships(), fetchTrialsForUser(admin.id, true)]);
  return (
    <div className="flex flex-col gap-5">
      <div>
        <h1>Administration</h1>
        <p className="text-sm text-stone-600">Accounts and who holds which role on which trial. Being administrator does not unblind you.</p>
      </div>
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-2">
        <Card title="Create an account">
          <CreateAccountForm />
        </Card>
        <Card title="Give a role on a trial">
          <AssignRoleForm users={users.filter((u) => u.isActive).map((u) => ({ id: u.id, label: `${u.name} <${u.email}>` }))} trials={trials.map((t) => ({ id: t.id, label: `${t.code}: ${t.title}` }))} />
        </Card>
      </div>
      <Card title={`Accounts (${users.length})`}>
        <table className="cairn-table" aria-label="Accounts">
          <thead>
            <tr><th>Name</th><th>E-mail</th><th>Administrator</th><th>Active</th><th><span className="sr-only">Actions</span></th></tr>
          </thead>
          <tbody>
            {users.map((u) => (
              <tr key={u.id}>
                <td>{u.name}</td>
                <td>{u.email}</td>
                <td>{u.isAdmin ? <Badge tone="teal">yes</Badge> : "no"}</td>
                <td>{u.isActive ? "yes" : <Badge>deactivated</Badge>}</td>
                <td><AccountActions userId={u.id} name={u.name} isActive={u.isActive} isSelf={u.id === admin.id} /></td>
              </tr>
            ))}
          </tbody>
        </table>
      </Card>
      <Card title="Trial roles">
        {memberships.length === 0 ? (
          <p className="text-sm text-stone-600">No one holds a role on any trial yet.</p>
        ) : (
          <table className="cairn-table" aria-label="Trial roles">
            <thead>
              <tr><th>Trial</th><th>Person</th><th>Role</th><th><span className="sr-only">Actions</span></th></tr>
            </thead>
            <tbody>
              {memberships.map((m) => (
                <tr key={m.id}>
                  <td>{m.trialCode}</td>
                  <td>{m.userName} <span className="text-stone-500">&lt;{m.userEmail}&gt;</span></td>
                  <td>{ROLE_LABELS[m.role]}</td>
                  <td><RemoveRoleButton membershipId={m.id} label={`Remove ${ROLE_LABELS[m.role]} of ${m.userName} on ${m.trialCode}`} /></td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </Card>
    </div>
  );
}
