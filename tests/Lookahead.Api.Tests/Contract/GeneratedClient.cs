using System.Reflection;
using System.Runtime.Loader;
using Microsoft.CodeAnalysis;
using Microsoft.CodeAnalysis.CSharp;
using NJsonSchema.CodeGeneration.CSharp;
using NSwag.CodeGeneration.CSharp;
using NSwag.CodeGeneration.OperationNameGenerators;

namespace Lookahead.Api.Tests.Contract;

/// <summary>
/// A C# client generated from an OpenAPI document by NSwag (lists for arrays, one class named by operation ids),
/// compiled in memory with Roslyn together with a driver that uses it, and loaded in a collectible context. Newtonsoft
/// JSON, NSwag's default: its enum converter reads the wire names (iteration-limit, urn:lookahead:problem:…) through
/// EnumMember, which NSwag's System.Text.Json output cannot.
/// </summary>
public static class GeneratedClient
{
    public const string Namespace = "Generated";
    public const string ClassName = "LookaheadClient";

    public static async Task<string> GenerateAsync(string openApiJson)
    {
        var document = await NSwag.OpenApiDocument.FromJsonAsync(openApiJson);
        var settings = new CSharpClientGeneratorSettings
        {
            ClassName = ClassName,
            GenerateClientInterfaces = false,
            UseBaseUrl = false,
            OperationNameGenerator = new SingleClientFromOperationIdOperationNameGenerator(),
            CSharpGeneratorSettings =
            {
                Namespace = Namespace,
                JsonLibrary = CSharpJsonLibrary.NewtonsoftJson,
                ArrayType = "System.Collections.Generic.List",
                ArrayInstanceType = "System.Collections.Generic.List",
                GenerateNullableReferenceTypes = false,
            },
        };
        return new CSharpClientGenerator(document, settings).GenerateFile();
    }

    /// <summary>Compiles the sources against the runtime's own assemblies; the errors, if any, with their lines.</summary>
    public static Assembly Compile(params string[] sources)
    {
        var trees = sources.Select(s => CSharpSyntaxTree.ParseText(s, new CSharpParseOptions(LanguageVersion.Latest))).ToList();
        var references = ((string)AppContext.GetData("TRUSTED_PLATFORM_ASSEMBLIES")!)
            .Split(Path.PathSeparator)
            .Append(typeof(Newtonsoft.Json.JsonConvert).Assembly.Location)
            .Select(path => MetadataReference.CreateFromFile(path));
        var compilation = CSharpCompilation.Create(
            "Lookahead.GeneratedClient." + Guid.NewGuid().ToString("N"),
            trees,
            references,
            new CSharpCompilationOptions(OutputKind.DynamicallyLinkedLibrary, nullableContextOptions: NullableContextOptions.Disable));
        using var image = new MemoryStream();
        var result = compilation.Emit(image);
        if (!result.Success)
        {
            var errors = result.Diagnostics.Where(d => d.Severity == DiagnosticSeverity.Error).Take(20).Select(d => d.ToString());
            throw new InvalidOperationException("the generated client does not compile:\n" + string.Join("\n", errors));
        }

        image.Position = 0;
        return new AssemblyLoadContext("generated-client", isCollectible: true).LoadFromStream(image);
    }
}
