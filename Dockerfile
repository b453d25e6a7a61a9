# Loamwave image for workers and the coordinator (docker-compose.yml): Node 20, dependencies exactly as locked,
# TypeScript compiled to dist/ (worker threads load compiled JavaScript), development packages pruned.
FROM node:20-slim AS build
WORKDIR /app
COPY package.json package-lock.json ./
# Install without running scripts (the project's `prepare` compiles sources not copied yet), then run the
# packages' own install steps (prebuilt SQLite and DuckDB bindings).
RUN npm ci --ignore-scripts && npm rebuild
COPY tsconfig.json ./
COPY schemas schemas
COPY solver solver
COPY worker worker
COPY coordinator coordinator
COPY bench bench
RUN npx tsc -p tsconfig.json && npm prune --omit=dev

FROM node:20-slim
WORKDIR /app
ENV NODE_ENV=production
COPY --from=build /app/node_modules node_modules
COPY --from=build /app/dist dist
COPY package.json ./
COPY bin bin
COPY examples examples
# Runs as the image's unprivileged `node` user (uid 1000, gid 1000), never as root. A bind-mounted output folder
# must be writable by the user the container runs as: docker-compose.yml runs the coordinator as
# ${LOAMWAVE_UID:-1000}:${LOAMWAVE_GID:-1000}, so `LOAMWAVE_UID=$(id -u) LOAMWAVE_GID=$(id -g)` makes ./out yours.
RUN mkdir -p /app/out && chown node:node /app/out
USER node
ENTRYPOINT ["node", "bin/loamwave.js"]
CMD ["--help"]
