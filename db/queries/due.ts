import { sql, type SQL } from 'drizzle-orm';
import type { Db } from '../client';
import { likePattern, type Page } from '@/lib/list-query';
import type { DueRow, DueStatus } from '@/lib/fleet/due';

export type { DueRow };

export const DUE_SORTS = ['nextDue', 'model', 'customer'] as const;
export type DueSort = (typeof DUE_SORTS)[number];


/**
 * Each machine with its last leveling, next due date and status, computed in PostgreSQL with the same
 * month arithmetic as lib/fleet/due.ts (`date + make_interval(months => n)` clamps to the month end).
 */
function dueRelation({ organisationId, today, soonDays, q }: { organisationId?: string; today: string; soonDays: number | 'organisation'; q?: string }): SQL {
  const soon = soonDays === 'organisation' ? sql`o.reminder_days_before` : sql`${soonDays}::int`;
  const where: SQL[] = [];
  if (organisationId) where.push(sql`m.organisation_id = ${organisationId}`);
  if (q) {
    const p = likePattern(q);
    where.push(sql`(m.model ilike ${p} or m.serial ilike ${p} or c.name ilike ${p} or s.name ilike ${p})`);
  }
  const whereSql = where.length ? sql`where ${sql.join(where, sql` and `)}` : sql``;
  return sql`(
    select d.*,
      case when d.next_due is null or d.next_due < ${today}::date then 'overdue'
           when d.next_due <= ${today}::date + d.soon_days then 'due-soon'
           else 'ok' end as status
    from (
      select l.*, (l.last_on + make_interval(months => l.check_interval_months))::date as next_due
      from (
        select m.id as machine_id, m.organisation_id, m.model, m.serial, m.check_interval_months, m.created_at,
          c.name as customer_name, s.name as site_name, s.address as site_address, ${soon} as soon_days,
          greatest(la.last_approved, m.prior_leveled_on) as last_on
        from machines m
        join organisations o on o.id = m.organisation_id
        join sites s on s.id = m.site_id
        join customers c on c.id = s.customer_id
        left join lateral (
          select max((ls.approved_at at time zone 'UTC')::date) as last_approved
          from leveling_sessions ls
          where ls.machine_id = m.id and ls.approved_at is not null
        ) la on true
        ${whereSql}
      ) l
    ) d
  )`;
}

const orderBy: Record<DueSort, Record<'asc' | 'desc', SQL>> = {
  nextDue: { asc: sql`next_due asc nulls first, model asc, machine_id`, desc: sql`next_due desc nulls last, model asc, machine_id` },
  model: { asc: sql`model asc, serial asc, machine_id`, desc: sql`model desc, serial desc, machine_id` },
  customer: { asc: sql`customer_name asc, site_name asc, model asc, machine_id`, desc: sql`customer_name desc, site_name desc, model asc, machine_id` },
};

/** The due list of one organisation: filtered, sorted and paged in the database. */
export async function listDueMachines(
  db: Db,
  input: { organisationId: string; today: string; soonDays: number; status: DueStatus | 'all'; q: string; sort: DueSort; dir: 'asc' | 'desc'; page: number; pageSize: number },
): Promise<Page<DueRow>> {
  const rel = dueRelation(input);
  const statusWhere = input.status === 'all' ? sql`true` : sql`status = ${input.status}`;
  const [rows, count] = await Promise.all([
    db.execute<Record<string, unknown>>(sql`
      select p.*, v.next_visit_at
      from (
        select machine_id, model, serial, customer_name, site_name, check_interval_months,
          to_char(last_on, 'YYYY-MM-DD') as last_on, to_char(next_due, 'YYYY-MM-DD') as next_due, status
        from ${rel} due
        where ${statusWhere}
        order by ${orderBy[input.sort][input.dir]}
        limit ${input.pageSize} offset ${(input.page - 1) * input.pageSize}
      ) p
      left join lateral (
        select min(vi.scheduled_for) as next_visit_at from visits vi
        where vi.machine_id = p.machine_id and vi.organisation_id = ${input.organisationId} and vi.state in ('scheduled', 'in_progress')
      ) v on true
      order by ${orderBy[input.sort][input.dir]}`),
    db.execute<{ total: number }>(sql`select count(*)::int as total from ${rel} due where ${statusWhere}`),
  ]);
  return {
    rows: rows.rows.map((r) => ({
      machineId: String(r.machine_id),
      model: String(r.model),
      serial: String(r.serial),
      customerName: String(r.customer_name),
      siteName: String(r.site_name),
      checkIntervalMonths: Number(r.check_interval_months),
      lastLeveledOn: (r.last_on as string | null) ?? null,
      nextDueOn: (r.next_due as string | null) ?? null,
      status: r.status as DueStatus,
      nextVisitAt: r.next_visit_at ? new Date(r.next_visit_at as string).toISOString() : null,
    })),
    total: count.rows[0]?.total ?? 0,
    page: input.page,
    pageSize: input.pageSize,
  };
}

/** How many machines of an organisation are overdue and due within `soonDays`: for the start page's summary. */
export async function countDueByStatus(db: Db, { organisationId, today, soonDays }: { organisationId: string; today: string; soonDays: number }) {
  const res = await db.execute<{ status: DueStatus; n: number }>(sql`select status, count(*)::int as n from ${dueRelation({ organisationId, today, soonDays })} due group by status`);
  const by = Object.fromEntries(res.rows.map((r) => [r.status, r.n])) as Partial<Record<DueStatus, number>>;
  return { overdue: by.overdue ?? 0, dueSoon: by['due-soon'] ?? 0, ok: by.ok ?? 0 };
}

/** The organisation's warning period: days before a machine falls due that it shows as due soon and reminders go out. */
export async function getReminderDaysBefore(db: Db, { organisationId }: { organisationId: string }): Promise<number> {
  const res = await db.execute<{ days: number }>(sql`select reminder_days_before as days from organisations where id = ${organisationId}`);
  return res.rows[0]?.days ?? 14;
}

export type DueReminder = { machineId: string; organisationId: string; model: string; serial: string; siteName: string; customerName: string; dueOn: string };

/**
 * Records a reminder for every machine that is overdue or due within its organisation's `reminder_days_before`
 * and has none for that due date yet; returns only the rows this call inserted (ON CONFLICT DO NOTHING), so two
 * runs, or two processes, never remind twice. A machine never leveled is due from the day it was registered.
 */
export async function claimDueReminders(db: Db, { today, organisationId }: { today: string; organisationId?: string }): Promise<DueReminder[]> {
  const rel = dueRelation({ organisationId, today, soonDays: 'organisation' });
  const res = await db.execute<Record<string, unknown>>(sql`
    with claimed as (
      insert into due_reminders (machine_id, due_on)
      select machine_id, coalesce(next_due, (created_at at time zone 'UTC')::date)
      from ${rel} due
      where status in ('overdue', 'due-soon')
      on conflict do nothing
      returning machine_id, due_on
    )
    select cl.machine_id, to_char(cl.due_on, 'YYYY-MM-DD') as due_on, m.organisation_id, m.model, m.serial, s.name as site_name, c.name as customer_name
    from claimed cl
    join machines m on m.id = cl.machine_id
    join sites s on s.id = m.site_id
    join customers c on c.id = s.customer_id
    order by m.organisation_id, cl.due_on, m.model`);
  return res.rows.map((r) => ({
    machineId: String(r.machine_id),
    organisationId: String(r.organisation_id),
    model: String(r.model),
    serial: String(r.serial),
    siteName: String(r.site_name),
    customerName: String(r.customer_name),
    dueOn: String(r.due_on),
  }));
}

/** Gives back a claimed reminder whose mail could not be sent, so the next run tries again. */
export async function releaseDueReminder(db: Db, { machineId, dueOn }: { machineId: string; dueOn: string }) {
  await db.execute(sql`delete from due_reminders where machine_id = ${machineId} and due_on = ${dueOn}::date`);
}
