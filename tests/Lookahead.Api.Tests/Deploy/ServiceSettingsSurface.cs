using System.Collections;
using System.Reflection;
using Microsoft.AspNetCore.Hosting;
using Microsoft.Extensions.Options;
using Serilog;

namespace Lookahead.Api.Tests.Deploy;

/// <summary>
/// The configuration keys the service reads: the public settable properties of every options class it binds to
/// configuration (found by reflection over the service's assembly: a <c>public const string Section</c>, confirmed
/// bound by the running service), plus the few framework keys it relies on.
/// </summary>
public sealed class ServiceSettingsSurface
{
    /// <summary>
    /// Keys read by the framework or a library rather than an options class of the service. Not here: Logging:*,
    /// because the service logs through Serilog (AddSerilog replaces the logger factory), so Logging:LogLevel has no effect.
    /// </summary>
    public static readonly IReadOnlyList<(SettingPattern Pattern, string ReadBy)> FrameworkKeys =
    [
        (new SettingPattern("Urls"), $"the web host's listen addresses ('{WebHostDefaults.ServerUrlsKey}', also --urls)"),
        (new SettingPattern("AllowedHosts"), "host filtering, which WebApplication adds by default"),
        (new SettingPattern($"{ConfigurationLoggerConfigurationExtensions.DefaultSectionName}:**"), "Serilog's ReadFrom.Configuration (Hosting/HostBuilderExtensions.cs)"),
    ];

    private ServiceSettingsSurface(IReadOnlyList<OptionsSection> sections, IReadOnlyList<Type> unbound)
    {
        Sections = sections;
        UnboundSectionTypes = unbound;
        Patterns = [.. FrameworkKeys.Select(f => f.Pattern), .. sections.SelectMany(s => s.Keys)];
    }

    public IReadOnlyList<OptionsSection> Sections { get; }

    /// <summary>Classes that declare a Section but that the running service does not bind (dead settings).</summary>
    public IReadOnlyList<Type> UnboundSectionTypes { get; }

    public IReadOnlyList<SettingPattern> Patterns { get; }

    public bool Reads(string key) => Patterns.Any(p => p.Matches(key));

    /// <summary>Reads the surface from the service's assembly, checking each options class against the running service's registrations.</summary>
    public static ServiceSettingsSurface Discover(IServiceProvider services)
    {
        var sections = new List<OptionsSection>();
        var unbound = new List<Type>();
        foreach (var type in typeof(Program).Assembly.GetTypes().Where(t => t is { IsClass: true, IsAbstract: false }).OrderBy(t => t.FullName, StringComparer.Ordinal))
        {
            var field = type.GetField("Section", BindingFlags.Public | BindingFlags.Static);
            if (field is not { IsLiteral: true } || field.FieldType != typeof(string))
            {
                continue;
            }

            // BindConfiguration registers a change-token source for the options type; nothing else does.
            var sources = typeof(IEnumerable<>).MakeGenericType(typeof(IOptionsChangeTokenSource<>).MakeGenericType(type));
            if (services.GetService(sources) is not IEnumerable registered || !registered.Cast<object>().Any())
            {
                unbound.Add(type);
                continue;
            }

            string section = (string)field.GetRawConstantValue()!;
            sections.Add(new OptionsSection(type, section, [.. KeysOf(type, section, depth: 0).Select(k => new SettingPattern(k))]));
        }

        return new ServiceSettingsSurface(sections, unbound);
    }

    /// <summary>The keys the configuration binder fills on <paramref name="type"/>: leaves by name, collections and dictionaries by '*'.</summary>
    public static IEnumerable<string> KeysOf(Type type, string prefix, int depth)
    {
        if (depth > 8)
        {
            throw new InvalidOperationException($"{type} nests deeper than the deploy check follows");
        }

        foreach (var property in type.GetProperties(BindingFlags.Public | BindingFlags.Instance).Where(p => p.GetIndexParameters().Length == 0))
        {
            string key = $"{prefix}:{property.Name}";
            var element = ElementType(property.PropertyType);
            if (element is not null)
            {
                foreach (string inner in IsLeaf(element) ? [$"{key}:*"] : KeysOf(element, $"{key}:*", depth + 1))
                {
                    yield return inner;
                }
            }
            else if (property.SetMethod is not { IsPublic: true })
            {
                // The binder sets only public setters (collections above are filled in place).
                continue;
            }
            else if (IsLeaf(property.PropertyType))
            {
                yield return key;
            }
            else
            {
                foreach (string inner in KeysOf(property.PropertyType, key, depth + 1))
                {
                    yield return inner;
                }
            }
        }
    }

    private static bool IsLeaf(Type type)
    {
        type = Nullable.GetUnderlyingType(type) ?? type;
        return type.IsPrimitive || type.IsEnum || type == typeof(string) || type == typeof(decimal) || type == typeof(TimeSpan)
            || type == typeof(DateTime) || type == typeof(DateTimeOffset) || type == typeof(Guid) || type == typeof(Uri);
    }

    /// <summary>The element (or dictionary value) type of a collection property, or null for anything else.</summary>
    private static Type? ElementType(Type type)
    {
        if (type == typeof(string))
        {
            return null;
        }

        if (type.IsArray)
        {
            return type.GetElementType();
        }

        var dictionary = type.GetInterfaces().Append(type).FirstOrDefault(i => i.IsGenericType && i.GetGenericTypeDefinition() == typeof(IDictionary<,>));
        if (dictionary is not null)
        {
            return dictionary.GetGenericArguments()[1];
        }

        var enumerable = type.GetInterfaces().Append(type).FirstOrDefault(i => i.IsGenericType && i.GetGenericTypeDefinition() == typeof(IEnumerable<>));
        return enumerable?.GetGenericArguments()[0];
    }
}

/// <summary>An options class of the service, the section it is bound to, and the keys it reads.</summary>
public sealed record OptionsSection(Type Type, string Section, IReadOnlyList<SettingPattern> Keys);
