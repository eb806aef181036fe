# threadcount: build the TypeScript, then run it on a slim Debian-based Node 20 image as a non-root user.
FROM node:20-bookworm-slim AS build
WORKDIR /app
COPY package.json package-lock.json ./
RUN npm ci --no-audit --no-fund
COPY tsconfig.json tsconfig.build.json ./
COPY bot ./bot
COPY adapters ./adapters
COPY analysis ./analysis
COPY config ./config
COPY cli ./cli
RUN npm run build

FROM node:20-bookworm-slim AS runtime
ENV NODE_ENV=production
# glibc's allocator, set before start (glibc reads it only then; the list and why: cli/allocator.ts).
# Without it a long-running serve's resident memory crept up run after run with no growth in the
# JavaScript heap or in DuckDB's own accounts (bench:chat-memory, BENCHMARKS.md).
ENV MALLOC_ARENA_MAX=2
ENV MALLOC_MMAP_THRESHOLD_=131072
ENV MALLOC_TRIM_THRESHOLD_=131072
WORKDIR /app
COPY package.json package-lock.json ./
RUN npm ci --omit=dev --no-audit --no-fund && npm cache clean --force
COPY --from=build /app/dist ./dist
COPY bin ./bin
COPY config/examples ./config/examples
# The local channel's page is read at run time from the package root.
COPY adapters/local-channel/page ./adapters/local-channel/page
RUN useradd --system --uid 10001 --home-dir /app threadcount && mkdir -p /app/out && chown threadcount /app/out
USER threadcount
# The config (and its data file) is mounted at /config; start writes to /app/out.
# Inside the container the local channel must listen beyond loopback to be reachable, so serve
# and start refuse to run without THREADCOUNT_ACCESS_TOKEN: pass one in at run time
# (docker run -e THREADCOUNT_ACCESS_TOKEN ...), never baked into the image. The API then wants it as
# a bearer token and the page signs in with it. Publishing on the host's loopback only
# (-p 127.0.0.1:8787:8787) is still the safer choice.
ENV THREADCOUNT_HOST=0.0.0.0
EXPOSE 8787 3000
ENTRYPOINT ["node", "bin/threadcount.js"]
CMD ["start"]
