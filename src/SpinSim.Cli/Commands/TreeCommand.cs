using System.CommandLine;
using SpinSim.Core.Model;
using SpinSim.Figures.Plots;
using SpinSim.Formats.Output;

namespace SpinSim.Cli.Commands;

/// <summary>
/// <c>spinsim tree SYSTEM NUCLEUS</c>: the first-order splitting diagram of one nucleus, and how far from first order it is
/// (the smallest |delta nu / J| to its partners of the same isotope).
/// </summary>
public static class TreeCommand
{
    /// <summary>Below this |delta nu / J| a splitting diagram misleads: the pattern is second order (the data line's rule).</summary>
    public const double FirstOrderRatio = SpinSim.Core.Reporting.NmrDataLine.FirstOrderRatio;

    public static Command Build(CommandIo io)
    {
        var file = SystemInput.FileArgument();
        var nucleus = new Argument<string>("nucleus") { Description = "Id of the nucleus (or equivalent set) whose splitting diagram to draw", HelpName = "ID" };
        var field = SystemInput.FieldOption();
        var figure = new FigureChoice();
        var command = new Command("tree", "Draw the first-order splitting diagram (coupling tree) of one nucleus and say whether first order holds") { file, nucleus, field };
        figure.AddTo(command);
        command.SetAction(parse =>
        {
            var path = parse.GetValue(file)!;
            var (_, system) = SystemInput.Load(io, path, parse.GetValue(field));
            var id = parse.GetValue(nucleus)!;
            var e = system.IndexOf(id);
            if (e < 0) throw new UserInputException(path, $"no nucleus \"{id}\"", $"The ids are {string.Join(", ", system.Nuclei.Select(n => n.Id))}");
            var figurePath = parse.GetValue(figure.Path);
            var options = figurePath is null ? null : figure.Options(parse, $"First-order splitting of {SpinSim.Core.Reporting.Typography.Primes(id)}");
            using var outputs = new StagedOutputs([path]);
            if (figurePath is not null)
            {
                FigureChoice.FormatOf(figurePath);
                outputs.Check(figurePath);
            }
            var j = system.CouplingMatrixHz();
            var partners = Enumerable.Range(0, system.Nuclei.Count).Where(p => p != e && j[e, p] != 0)
                .Select(p => (Partner: system.Nuclei[p].Id, JHz: j[e, p], Count: system.Nuclei[p].Count, Index: p))
                .OrderByDescending(p => Math.Abs(p.JHz)).ToList();
            io.Out.WriteLine($"{id} at {system.Nuclei[e].Shift.Value:0.####} ppm, {system.Field.Value:0.###} MHz: first-order pattern " +
                             $"{CouplingTreeFigure.PatternName(partners.Select(p => (p.Partner, p.JHz, p.Count)).ToList())}");
            var secondOrder = new List<string>();
            foreach (var p in partners)
            {
                var sameIsotope = system.Nuclei[p.Index].Isotope == system.Nuclei[e].Isotope;
                var ratio = sameIsotope ? Math.Abs(system.FrequencyHz(e) - system.FrequencyHz(p.Index)) / Math.Abs(p.JHz) : double.PositiveInfinity;
                io.Out.WriteLine($"  J to {p.Partner} (x{p.Count}) = {p.JHz:0.###} Hz{(sameIsotope ? $", |dnu/J| = {ratio:0.##}" : ", heteronuclear")}");
                if (ratio < FirstOrderRatio)
                    secondOrder.Add(string.Create(System.Globalization.CultureInfo.InvariantCulture, $"|Δν/J| = {ratio:0.#} to {SpinSim.Core.Reporting.Typography.Primes(p.Partner)}"));
                if (ratio < FirstOrderRatio)
                    io.Warn($"|dnu/J| to {p.Partner} is below {FirstOrderRatio}: the real pattern is second order and the diagram is only a guide; use simulate");
            }
            if (figurePath is not null)
                FigureChoice.Write(outputs, figurePath, CouplingTreeFigure.Create(id, system.FrequencyHz(e), partners.Select(p => (p.Partner, p.JHz, p.Count)).ToList(), options!,
                    secondOrder.Count == 0 ? null
                        : $"First order does not hold ({string.Join(", ", secondOrder)}; below {FirstOrderRatio:0}): the real pattern differs, simulate it."), options!);
            foreach (var written in outputs.Commit()) io.Status($"written: {written}");
            return ExitCodes.Success;
        });
        return command;
    }
}
