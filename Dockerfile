# Pulsewright workbench in a small static image.
#   docker build -t pulsewright .
#   docker run -p 8750:8750 -v pulsewright-data:/data pulsewright
# The server listens on 0.0.0.0 inside the container, so it requires an
# access token: it prints the URL with the token in its log. Set
# PULSEWRIGHT_TOKEN to choose the token yourself.

FROM golang:1.26 AS build
WORKDIR /src
COPY go.mod go.sum ./
RUN go mod download
COPY . .
RUN CGO_ENABLED=0 go build -trimpath -ldflags="-s -w" -o /out/pulsewright ./cmd/pulsewright \
 && mkdir /out/data

# distroless/static: no shell, no libc, CA certificates and a nonroot user.
FROM gcr.io/distroless/static-debian12:nonroot
COPY --from=build /out/pulsewright /pulsewright
ENV PULSEWRIGHT_ADDR=0.0.0.0:8750 \
    PULSEWRIGHT_DATA_DIR=/data \
    PULSEWRIGHT_LOG_FORMAT=json
# distroless's nonroot user (65532) owns the data directory in a fresh volume.
COPY --from=build --chown=65532:65532 /out/data /data
VOLUME ["/data"]
EXPOSE 8750
USER nonroot:nonroot
ENTRYPOINT ["/pulsewright", "serve"]
