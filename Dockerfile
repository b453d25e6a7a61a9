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
# Runs as root so that bind-mounted output folders (./out) are writable without matching user ids.
ENTRYPOINT ["node", "bin/loamwave.js"]
CMD ["--help"]
