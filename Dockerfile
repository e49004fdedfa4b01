# Tidemark service image (docs/deployment.md). Build: docker build -t tidemark .
# Not built in the repository's CI (no container engine there): keep it plain.

# Build stage: the full image has python3, make and g++ in case better-sqlite3 has to compile (no prebuilt binary).
FROM node:20-bookworm AS build
WORKDIR /app
COPY package.json package-lock.json ./
RUN npm ci
COPY tsconfig.json tsconfig.build.json ./
COPY src ./src
RUN npm run build && npm prune --omit=dev

# Run stage: same Debian release, so the native module built above loads here.
FROM node:20-bookworm-slim
ENV NODE_ENV=production \
    HOST=0.0.0.0 \
    PORT=8080 \
    TIDEMARK_SQLITE_PATH=/app/data/tidemark-audit.sqlite
WORKDIR /app
COPY --from=build /app/package.json ./
COPY --from=build /app/node_modules ./node_modules
COPY --from=build /app/dist ./dist
# Read at run time, found from dist/ as ../cards and ../docs.
COPY cards ./cards
COPY docs ./docs
RUN mkdir -p /app/data && chown node:node /app/data
USER node
VOLUME /app/data
EXPOSE 8080
HEALTHCHECK CMD ["node", "-e", "fetch('http://127.0.0.1:' + (process.env.PORT || 8080) + '/healthz').then((r) => process.exit(r.ok ? 0 : 1), () => process.exit(1))"]
# node itself is PID 1, so `docker stop` (SIGTERM, then SIGKILL after 10 s) reaches the graceful stop directly.
CMD ["node", "dist/cli/serve.js"]
