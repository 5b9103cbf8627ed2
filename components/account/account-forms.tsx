"use client";

import { useRouter } from "next/navigation";
import { Alert } from "../ui/alert";
import { Button } from "../ui/button";
import { Field } from "../ui/field";
import { useFormSend } from "../ui/use-form-send";

export function ProfileForm({ name, affiliation }: { name: string; affiliation: string }) {
  const f = useFormSend<{ message: string }>();
  const router = useRouter();
  return (
    <form
      noValidate
      className="flex max-w-md flex-col gap-4"
      onSubmit={async (e) => {
        e.preventDefault();
        const d = new FormData(e.currentTarget);
        const ok = await f.send("/api/account/profile", { name: String(d.get("name") ?? ""), affiliation: String(d.get("affiliation") ?? "") }, "PATCH");
        if (ok) router.refresh();
      }}
    >
      {f.data ? <Alert tone="success">{f.data.message}</Alert> : null}
      {f.message ? <Alert tone="error">{f.message}</Alert> : null}
      <Field label="Name" name="name" defaultValue={name} autoComplete="name" required errors={f.fieldErrors("name")} />
      <Field label="Affiliation" name="affiliation" defaultValue={affiliation} autoComplete="organization" errors={f.fieldErrors("affiliation")} />
      <div>
        <Button type="submit" disabled={f.pending}>
          Save profile
        </Button>
      </div>
    </form>
  );
}

export function ChangePasswordForm({ minLength }: { minLength: number }) {
  const f = useFormSend<{ message: string }>();
  return (
    <form
      noValidate
      className="flex max-w-md flex-col gap-4"
      onSubmit={async (e) => {
        e.preventDefault();
        const form = e.currentTarget;
        const d = new FormData(form);
        const ok = await f.send("/api/account/password", { currentPassword: String(d.get("currentPassword") ?? ""), newPassword: String(d.get("newPassword") ?? "") });
        if (ok) form.reset();
      }}
    >
      {f.data ? <Alert tone="success">{f.data.message}</Alert> : null}
      {f.message ? <Alert tone="error">{f.message}</Alert> : null}
      <Field label="Current password" name="currentPassword" type="password" autoComplete="current-password" required errors={f.fieldErrors("currentPassword")} />
      <Field
        label="New password"
        name="newPassword"
        type="password"
        autoComplete="new-password"
        required
        hint={`At least ${minLength} characters; common passwords are refused.`}
        errors={f.fieldErrors("newPassword")}
      />
      <div>
        <Button type="submit" disabled={f.pending}>
          Change password
        </Button>
      </div>
    </form>
  );
}
