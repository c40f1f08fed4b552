// Tells the ingest that the device registry changed (a device registered, assigned, unassigned, its token issued,
// rotated or revoked, its status changed), so it re-reads its device list within seconds instead of waiting for its
// periodic refresh. Inside a transaction PostgreSQL sends the notification on commit, never on rollback.
import type { Knex } from "knex";

export const DEVICE_REGISTRY_CHANNEL = "corvane_devices";

export async function notifyDeviceRegistryChanged(knex: Knex | Knex.Transaction, deviceId: string): Promise<void> {
  await knex.raw("SELECT pg_notify(?, ?)", [DEVICE_REGISTRY_CHANNEL, deviceId]);
}
