# phasecast: a static binary on a distroless base, running `phasecast serve`
# as a non-root user with its SQLite database on the /data volume.
#
#   docker build -t phasecast .
#   docker run -p 8080:8080 -v phasecast-data:/data phasecast

FROM golang:1.26 AS build
WORKDIR /src
COPY go.mod go.sum ./
RUN go mod download
COPY . .
# Pure Go (modernc.org/sqlite): no cgo, so the binary is static.
RUN CGO_ENABLED=0 go build -trimpath -ldflags="-s -w" -o /out/phasecast ./cmd/phasecast \
 && mkdir -p /out/data

FROM gcr.io/distroless/static-debian12:nonroot
COPY --from=build /out/phasecast /phasecast
# The volume starts out owned by the non-root user (65532 in distroless).
COPY --from=build --chown=65532:65532 /out/data /data
USER 65532:65532
VOLUME ["/data"]
EXPOSE 8080
ENTRYPOINT ["/phasecast"]
CMD ["serve", "--addr", ":8080", "--db", "/data/phasecast.db"]
