// The compose file and Dockerfile against the real command line: every command a service runs parses with the
// options `buildProgram()` defines, environment variables are ones an option reads, Redis runs durable and never
// evicts, and the image builds what the entry point loads. (No Docker engine here: the files are checked as data.)
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Command } from 'commander';
import { parse } from 'yaml';
import { describe, expect, it } from 'vitest';
import { buildProgram } from '../coordinator/cli.js';
import { PROJECT_ROOT } from './helpers/compiled.js';

interface Service {
  image?: string;
  build?: unknown;
  command?: string[];
  environment?: Record<string, string>;
  volumes?: string[];
  depends_on?: Record<string, { condition: string }>;
  user?: string;
}

const compose = parse(readFileSync(join(PROJECT_ROOT, 'docker-compose.yml'), 'utf8')) as { services: Record<string, Service> };
const dockerfile = readFileSync(join(PROJECT_ROOT, 'Dockerfile'), 'utf8');

/** Compose interpolation (`${SWEEP:-default}`) as compose applies it with the variable unset. */
const interpolate = (s: string) => s.replace(/\$\{(\w+):-([^}]*)\}/g, (_m, _name, dflt: string) => dflt);

function subcommand(name: string): Command {
  const cmd = buildProgram().commands.find((c) => c.name() === name);
  if (!cmd) throw new Error(`no command ${name}`);
  return cmd;
}

/** Parse a service's arguments with commander itself: unknown options come back in `unknown`. */
function parsedBy(args: string[]): { cmd: Command; operands: string[]; unknown: string[] } {
  const [name, ...rest] = args.map(interpolate);
  const cmd = subcommand(name);
  const { operands, unknown } = cmd.parseOptions(rest);
  return { cmd, operands, unknown };
}

describe('docker-compose.yml', () => {
  it('when Redis starts then it keeps an append-only file and never evicts keys', () => {
    const cmd = compose.services.redis.command!;
    expect(cmd[0]).toBe('redis-server');
    expect(cmd.join(' ')).toContain('--appendonly yes');
    expect(cmd.join(' ')).toContain('--maxmemory-policy noeviction');
  });

  it.each(['worker', 'coordinator'])('when the %s service starts then its command parses with the real options', (service) => {
    const s = compose.services[service];
    const { cmd, unknown, operands } = parsedBy(s.command!);
    expect(unknown).toEqual([]);
    // Every value-taking option in the command is followed by a value, and every flag is one the command defines.
    const flags = new Set(cmd.options.map((o) => o.long));
    for (const a of s.command!.filter((x) => x.startsWith('--'))) expect(flags, a).toContain(a);
    if (service === 'coordinator') {
      expect(cmd.name()).toBe('run');
      expect(operands).toEqual(['/sweeps/quorvessin-vlf-coast.yaml']);
      expect(existsSync(join(PROJECT_ROOT, 'examples', 'quorvessin-vlf-coast.yaml'))).toBe(true);
      expect(s.command).toContain('--redis');
      expect(s.volumes).toContain('./examples:/sweeps:ro');
    }
  });

  it('when a service sets environment variables then each is one its command reads, and the Redis URL names the redis service', () => {
    for (const [name, s] of Object.entries(compose.services)) {
      if (!s.environment || !s.command) continue;
      const { cmd } = parsedBy(s.command);
      const envVars = cmd.options.map((o) => o.envVar).filter(Boolean);
      for (const key of Object.keys(s.environment)) expect(envVars, `${name}: ${key}`).toContain(key);
    }
    const url = compose.services.worker.environment!.LOAMWAVE_REDIS_URL;
    expect(new URL(url).hostname).toBe('redis');
    expect(new URL(interpolate(compose.services.coordinator.command![3])).hostname).toBe('redis');
  });

  it('when workers are scaled then nothing ties a worker to one container (no fixed name, port or shared volume)', () => {
    const w = compose.services.worker as Service & { container_name?: string; ports?: unknown };
    expect(w.container_name).toBeUndefined();
    expect(w.ports).toBeUndefined();
    expect(w.volumes).toBeUndefined();
    expect(w.depends_on?.redis.condition).toBe('service_healthy');
  });
});

describe('running as a non-root user', () => {
  it('when the image runs then its last USER is an unprivileged one, and the coordinator writing ./out runs as a settable uid', () => {
    // Common practice (container hardening): a service that needs no privilege runs without root.
    const users = [...dockerfile.matchAll(/^USER (\S+)$/gm)].map((m) => m[1]);
    expect(users.length).toBeGreaterThan(0);
    expect(['root', '0', '0:0']).not.toContain(users[users.length - 1]);
    const user = compose.services.coordinator.user;
    expect(user).toBeDefined();
    const [uid, gid] = interpolate(user!).split(':');
    expect(Number(uid)).toBeGreaterThan(0);
    expect(Number(gid)).toBeGreaterThan(0);
    expect(user).toMatch(/LOAMWAVE_UID/);
  });

  it('when the compose project runs then Redis publishes no port beyond its own network', () => {
    expect((compose.services.redis as Service & { ports?: unknown }).ports).toBeUndefined();
  });
});

describe('Dockerfile', () => {
  it('when the image is built then it uses Node 20 slim, the lockfile, compiles, and enters through bin/loamwave.js', () => {
    expect(dockerfile).toMatch(/^FROM node:20-slim AS build$/m);
    expect(dockerfile).toMatch(/npm ci/);
    expect(dockerfile).toMatch(/npx tsc -p tsconfig\.json/);
    expect(dockerfile).toMatch(/^ENTRYPOINT \["node", "bin\/loamwave\.js"\]$/m);
    // Every folder the TypeScript build includes is copied into the build stage.
    const tsconfig = JSON.parse(readFileSync(join(PROJECT_ROOT, 'tsconfig.json'), 'utf8')) as { include: string[] };
    for (const dir of tsconfig.include) expect(dockerfile, dir).toMatch(new RegExp(`^COPY ${dir} ${dir}$`, 'm'));
  });
});
