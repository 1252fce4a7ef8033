using System.CommandLine;
using System.Text.Encodings.Web;
using System.Text.Json;
using System.Text.Json.Nodes;

namespace SpinSim.Cli.Commands;

/// <summary>
/// <c>spinsim demo</c>: SpinSim's whole job on bundled data of our own (invented values): simulates every example system
/// (the repository's spin-systems/, embedded in the program so that the demo runs from any folder), makes two synthetic measured traces (AA'BB' and ABX, with noise and a small phase error) from invented
/// true values, fits them from the example files' values, plans fields for one system and draws a splitting diagram.
/// Every step is an ordinary spinsim command, logged with its output in demo-log.txt; summary.json gathers the numbers.
/// </summary>
public static class DemoCommand
{
    /// <summary>Points of the demo's spectra and synthetic traces: enough for 0.6 Hz lines, small enough to commit.</summary>
    public const int Points = 16384;

    public static Command Build(CommandIo io)
    {
        var output = new Option<string>("--out") { Description = "Folder for the outputs (created if missing)", DefaultValueFactory = _ => "demo-output" };
        var systems = new Option<string?>("--systems") { Description = "Folder of spin systems to use instead of the bundled examples (written to OUT/spin-systems)" };
        var command = new Command("demo", "Run SpinSim's whole job on the bundled examples (invented values) and write figures, reports and spectra") { output, systems };
        command.SetAction(parse =>
        {
            var outDir = parse.GetValue(output)!;
            var systemsDir = parse.GetValue(systems);
            if (systemsDir is null)
            {
                systemsDir = Path.Combine(outDir, "spin-systems");
                WriteBundledSystems(systemsDir);
            }
            return Run(io, outDir, systemsDir);
        });
        return command;
    }

    private static int Run(CommandIo io, string outDir, string systemsDir)
    {
        if (!Directory.Exists(systemsDir))
            throw new UserInputException($"{systemsDir}: folder of example systems not found; run the demo from the repository root or give --systems");
        var files = Directory.GetFiles(systemsDir, "*.toml").Order(StringComparer.Ordinal).ToArray();
        if (files.Length == 0) throw new UserInputException($"{systemsDir}: no .toml spin systems in it");
        Directory.CreateDirectory(outDir);
        Directory.CreateDirectory(Path.Combine(outDir, "systems"));

        var log = new StringWriter();
        var summary = new JsonObject
        {
            ["note"] = "numbers from `spinsim demo`; all systems and true values are invented for the demonstration",
        };
        var dataLines = new StringWriter();
        // Runs one command, logs it with its output, and returns its stdout.
        string Step(params string[] args)
        {
            io.Out.WriteLine($"spinsim {string.Join(' ', args.Select(Quote))}");
            log.WriteLine($"$ spinsim {string.Join(' ', args.Select(Quote))}");
            var o = new StringWriter();
            var e = new StringWriter();
            var code = SpinSimCli.Run(args, o, e, io.Cancel);
            log.Write(o.ToString());
            log.Write(e.ToString());
            log.WriteLine();
            if (code != 0) throw new UserInputException($"demo step failed (exit {code}): spinsim {string.Join(' ', args)}\n{e}");
            return o.ToString();
        }

        // 1. Every example system: line list, spectrum and figure.
        var simulated = new JsonArray();
        foreach (var file in files)
        {
            var name = Path.GetFileNameWithoutExtension(file);
            var stem = Path.Combine(outDir, "systems", name);
            var output = Step("simulate", file, "--lines", stem + ".lines.csv", "--spectrum", stem + ".jdx", "--jcamp-form", "difdup",
                "--points", Points.ToString(), "--figure", stem + ".png", "--labels", "--sticks");
            var lineCount = File.ReadLines(stem + ".lines.csv").Count() - 1;
            var dataLine = DataLineOf(output);
            dataLines.WriteLine($"{Path.GetFileName(file)} (simulated, invented values):\n  {dataLine}");
            simulated.Add(new JsonObject { ["system"] = Path.GetFileName(file), ["lines"] = lineCount, ["data_line"] = dataLine });
        }
        summary["simulated"] = simulated;

        // 2. Three synthetic measured traces from invented true values, fitted from the example files' values: an AA'BB'
        // ring, an ABX with a 1H X, and the AB part of an ABX whose X is 19F (two solutions fit it equally well).
        var fits = new JsonArray();
        foreach (var (tag, start, seed, phaseError) in new[]
                 {
                     ("aabb", "para-ring-aabb.toml", "11", "1.5"), ("abx", "abx-stereocentre.toml", "12", "-2.0"),
                     ("abf", "fluoro-alkene-ab.toml", "13", "0"),
                 })
        {
            var truth = Path.Combine(outDir, $"truth-{tag}.toml");
            var setup = Path.Combine(outDir, $"fit-{tag}.toml");
            WriteResource($"truth-{tag}.toml", truth);
            WriteResource($"fit-{tag}.toml", setup);
            var measured = Path.Combine(outDir, $"measured-{tag}.jdx");
            Step("simulate", truth, "--spectrum", measured, "--jcamp-form", "difdup", "--points", Points.ToString(),
                "--noise", "0.005", "--seed", seed, "--phase-error", phaseError);
            var report = Path.Combine(outDir, $"fit-{tag}.json");
            // The ABX fit also runs the block bootstrap, to show the second error estimate, and draws its figure at the
            // width of one journal column (85 mm); the AA'BB' figure is two columns wide.
            Step(["fit", Path.Combine(systemsDir, start), "--data", measured, "--setup", setup, "--quiet",
                "--report", report, "--write-system", Path.Combine(outDir, $"fit-{tag}.best.toml"),
                "--figure", Path.Combine(outDir, $"fit-{tag}.png"), "--html", Path.Combine(outDir, $"fit-{tag}.html"),
                .. (tag == "abx" ? new[] { "--bootstrap", "40", "--width-mm", "85", "--height-mm", "95", "--no-title" } : [])]);
            using var json = JsonDocument.Parse(File.ReadAllText(report));
            var root = json.RootElement;
            fits.Add(new JsonObject
            {
                ["trace"] = Path.GetFileName(measured),
                ["start"] = start,
                ["true_values"] = Path.GetFileName(truth),
                ["converged"] = root.GetProperty("converged").GetBoolean(),
                ["rms"] = root.GetProperty("rms").GetDouble(),
                ["starts_at_best"] = root.GetProperty("starts_at_best").GetInt32(),
                ["report_line"] = root.GetProperty("report_line").GetString(),
                ["parameters"] = new JsonArray(root.GetProperty("parameters").EnumerateArray()
                    .Select(p => (JsonNode)new JsonObject
                    {
                        ["name"] = p.GetProperty("name").GetString(),
                        ["value"] = p.GetProperty("value").GetDouble(),
                        ["std_error"] = p.GetProperty("std_error").ValueKind == JsonValueKind.Number ? p.GetProperty("std_error").GetDouble() : null,
                        ["bootstrap_std_error"] = p.GetProperty("bootstrap_std_error").ValueKind == JsonValueKind.Number
                            ? p.GetProperty("bootstrap_std_error").GetDouble() : null,
                    }).ToArray()),
            });
            dataLines.WriteLine($"{Path.GetFileName(measured)} (fitted from {start}; synthetic trace from invented values):\n  {root.GetProperty("report_line").GetString()}");
        }
        summary["fits"] = fits;
        File.WriteAllText(Path.Combine(outDir, "data-lines.txt"), dataLines.ToString());
        log.WriteLine($"(data lines gathered in {Path.Combine(outDir, "data-lines.txt")})");

        // 3. Field planning for the AA'BB' ring, and a splitting diagram.
        var fields = Path.Combine(outDir, "fields-para-ring.json");
        var ring = Path.Combine(systemsDir, "para-ring-aabb.toml");
        var o = new StringWriter();
        var e = new StringWriter();
        log.WriteLine($"$ spinsim fields {Quote(ring)} --at 43,60,80,100,300,600 --json --figure {Quote(Path.Combine(outDir, "fields-para-ring.png"))}");
        io.Out.WriteLine($"spinsim fields {ring} --at 43,60,80,100,300,600 --json --figure {Path.Combine(outDir, "fields-para-ring.png")}");
        if (SpinSimCli.Run(["fields", ring, "--at", "43,60,80,100,300,600", "--json", "--figure", Path.Combine(outDir, "fields-para-ring.png")], o, e, io.Cancel) != 0)
            throw new UserInputException($"demo step failed: spinsim fields\n{e}");
        var fieldsJson = o.ToString();
        File.WriteAllText(fields, fieldsJson);
        log.WriteLine($"(JSON written to {fields})");
        summary["fields"] = JsonNode.Parse(fieldsJson);
        Step("tree", Path.Combine(systemsDir, "isopropyl.toml"), "CH", "--figure", Path.Combine(outDir, "tree-isopropyl-CH.png"));

        File.WriteAllText(Path.Combine(outDir, "demo-log.txt"), log.ToString().Replace(Path.GetFullPath(outDir), outDir));
        File.WriteAllText(Path.Combine(outDir, "summary.json"),
            summary.ToJsonString(new JsonSerializerOptions { WriteIndented = true, Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping }));
        io.Out.WriteLine($"demo outputs written to {outDir}/ (summary.json, demo-log.txt, figures, reports, spectra)");
        return 0;
    }

    /// <summary>The example systems embedded from the repository's spin-systems/ folder, written into <paramref name="folder"/>.</summary>
    private static void WriteBundledSystems(string folder)
    {
        Directory.CreateDirectory(folder);
        foreach (var resource in typeof(DemoCommand).Assembly.GetManifestResourceNames().Where(n => n.StartsWith("Systems.", StringComparison.Ordinal)))
        {
            using var stream = typeof(DemoCommand).Assembly.GetManifestResourceStream(resource)!;
            using var file = File.Create(Path.Combine(folder, resource["Systems.".Length..]));
            stream.CopyTo(file);
        }
    }

    private static string DataLineOf(string output) =>
        output.Split('\n').Select(l => l.TrimEnd('\r')).FirstOrDefault(l => l.StartsWith("data line: ", StringComparison.Ordinal))?["data line: ".Length..]
        ?? throw new InvalidOperationException("simulate printed no data line");

    private static void WriteResource(string name, string path)
    {
        using var stream = typeof(DemoCommand).Assembly.GetManifestResourceStream("Demo." + name)
            ?? throw new InvalidOperationException($"embedded demo file {name} is missing from the build");
        using var file = File.Create(path);
        stream.CopyTo(file);
    }

    private static string Quote(string s) => s.Contains(' ') ? $"\"{s}\"" : s;
}
