using System.CommandLine;
using SpinSim.Core.Model;
using SpinSim.Figures.Plots;
using SpinSim.Formats.SpinSystems;

namespace SpinSim.Cli.Commands;

/// <summary>
/// <c>spinsim tree SYSTEM NUCLEUS</c>: the first-order splitting diagram of one nucleus, and how far from first order it is
/// (the smallest |delta nu / J| to its partners of the same isotope).
/// </summary>
public static class TreeCommand
{
    /// <summary>Below this |delta nu / J| a splitting diagram misleads: the pattern is second order (common practice, no source).</summary>
    public const double FirstOrderRatio = 10;

    public static Command Build(CommandIo io)
    {
        var file = new Argument<string>("system") { Description = "Spin-system file (.toml or .json)" };
        var nucleus = new Argument<string>("nucleus") { Description = "Id of the nucleus (or equivalent set) whose splitting diagram to draw" };
        var field = new Option<double?>("--field") { Description = "Spectrometer 1H frequency in MHz; overrides the file's field" };
        var figure = new FigureChoice();
        var command = new Command("tree", "Draw the first-order splitting diagram (coupling tree) of one nucleus and say whether first order holds") { file, nucleus, field };
        figure.AddTo(command);
        command.SetAction(parse =>
        {
            var path = parse.GetValue(file)!;
            var system = SpinSystemFiles.Read(path).System;
            if (parse.GetValue(field) is { } mhz)
            {
                if (!(mhz > 0 && double.IsFinite(mhz))) throw new UserInputException($"--field must be above 0 MHz, got {mhz}");
                system = system.WithField(new SpinSim.Core.Units.FieldMHz(mhz));
            }
            var id = parse.GetValue(nucleus)!;
            var e = system.IndexOf(id);
            if (e < 0) throw new UserInputException($"{path}: no nucleus \"{id}\"; the ids are {string.Join(", ", system.Nuclei.Select(n => n.Id))}");
            var j = system.CouplingMatrixHz();
            var partners = Enumerable.Range(0, system.Nuclei.Count).Where(p => p != e && j[e, p] != 0)
                .Select(p => (Partner: system.Nuclei[p].Id, JHz: j[e, p], Count: system.Nuclei[p].Count, Index: p))
                .OrderByDescending(p => Math.Abs(p.JHz)).ToList();
            io.Out.WriteLine($"{id} at {system.Nuclei[e].Shift.Value:0.####} ppm, {system.Field.Value:0.###} MHz: first-order pattern " +
                             $"{CouplingTreeFigure.PatternName(partners.Select(p => (p.Partner, p.JHz, p.Count)).ToList())}");
            foreach (var p in partners)
            {
                var sameIsotope = system.Nuclei[p.Index].Isotope == system.Nuclei[e].Isotope;
                var ratio = sameIsotope ? Math.Abs(system.FrequencyHz(e) - system.FrequencyHz(p.Index)) / Math.Abs(p.JHz) : double.PositiveInfinity;
                io.Out.WriteLine($"  J to {p.Partner} (x{p.Count}) = {p.JHz:0.###} Hz{(sameIsotope ? $", |dnu/J| = {ratio:0.##}" : ", heteronuclear")}");
                if (ratio < FirstOrderRatio)
                    io.Out.WriteLine($"  warning: |dnu/J| to {p.Partner} is below {FirstOrderRatio}: the real pattern is second order and the diagram is only a guide; use simulate");
            }
            if (parse.GetValue(figure.Path) is { } figurePath)
            {
                var options = figure.Options(parse, $"Splitting of {id}, first order");
                FigureChoice.Write(figurePath, CouplingTreeFigure.Create(id, system.FrequencyHz(e), partners.Select(p => (p.Partner, p.JHz, p.Count)).ToList(), options), options, [path]);
                io.Out.WriteLine($"figure written to {figurePath}");
            }
            return 0;
        });
        return command;
    }
}
